/** @type {import('next').NextConfig} */

// Pages get a per-request nonce CSP and no-store from proxy.ts (lib/security-headers.ts). Route
// handlers skip the proxy, so they get theirs here: nothing may load or run from an API answer
// (kept equal to API_CONTENT_SECURITY_POLICY in lib/security-headers.ts), and no copy may be kept.
const apiCsp = "default-src 'none'; frame-ancestors 'none'; base-uri 'none'; form-action 'none'; sandbox";

const nextConfig = {
  // Parallel builds (several developers or test runs on one machine) each get their own output folder.
  distDir: process.env.NEXT_DIST_DIR || ".next",
  // knex pulls in drivers it never uses (pg, sqlite3, ...) when bundled; keep it and mysql2 external.
  serverExternalPackages: ["knex", "mysql2", "pdfkit", "nodemailer", "piscina", "smtp-server", "mailparser"],
  poweredByHeader: false,
  // The build type-checks (tsconfig.json covers app, components, lib, db, tests and scripts), so a type
  // error can never reach a served build.
  typescript: { ignoreBuildErrors: false },
  // The proxy (pages and their server actions) buffers request bodies; nothing Cairn accepts there is near 6 MB.
  experimental: { authInterrupts: true, proxyClientMaxBodySize: "6mb" },
  async headers() {
    return [
      {
        source: "/api/:path*",
        headers: [
          { key: "Content-Security-Policy", value: apiCsp },
          { key: "Cache-Control", value: "no-store" },
        ],
      },
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
