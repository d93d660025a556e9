import type { NextConfig } from "next";

const config: NextConfig = {
  poweredByHeader: false,
  // Uploads go to route handlers as streams; server actions only take small forms.
  experimental: { serverActions: { bodySizeLimit: "1mb" } },
};

export default config;
