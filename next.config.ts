import type { NextConfig } from "next";

const nextConfig: NextConfig = {
  // Loaded from node_modules at run time rather than bundled: native drivers and worker threads.
  serverExternalPackages: ["knex", "pg", "pino", "@node-rs/argon2"],
  poweredByHeader: false,
  // Maintenance attachments (service reports up to 8 MB, lib/devices/attachments) and device CSV files are sent to
  // server actions; the default 1 MB would refuse them before our own size check could explain why.
  experimental: { serverActions: { bodySizeLimit: "9mb" } },
  // npm test builds into its own folder, so it can run while npm start serves .next.
  distDir: process.env.CORVANE_DIST_DIR ?? ".next",
  async headers() {
    return [
      {
        source: "/:path*",
        headers: [
          { key: "X-Content-Type-Options", value: "nosniff" },
          { key: "Referrer-Policy", value: "same-origin" },
          { key: "X-Frame-Options", value: "DENY" },
          { key: "Permissions-Policy", value: "camera=(), microphone=(), geolocation=()" },
        ],
      },
    ];
  },
};

export default nextConfig;
