import type { NextConfig } from "next";
import { FIXED_HEADERS } from "./lib/security-headers";

const config: NextConfig = {
  poweredByHeader: false,
  // Uploads go to route handlers as streams; server actions only take small forms.
  experimental: { serverActions: { bodySizeLimit: "1mb" } },
  headers() {
    return Promise.resolve([{ source: "/:path*", headers: FIXED_HEADERS }]);
  },
};

export default config;
