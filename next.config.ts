import type { NextConfig } from "next";
import { FIXED_HEADERS } from "./lib/security-headers";

const config: NextConfig = {
  poweredByHeader: false,
  // Uploads go to route handlers as streams; server actions only take small forms, within Next's
  // default limit for a server action's body (1 MB, experimental.serverActions.bodySizeLimit,
  // left unset so that the build does not list an experiment).
  headers() {
    return Promise.resolve([{ source: "/:path*", headers: FIXED_HEADERS }]);
  },
};

export default config;
