/** @type {import('next').NextConfig} */
const isProd = process.env.NODE_ENV === "production";

// CSP without unsafe-eval in production. Plotly draws with inline styles, hence style-src 'unsafe-inline'.
const csp = [
  "default-src 'self'",
  `script-src 'self' 'unsafe-inline'${isProd ? "" : " 'unsafe-eval'"}`,
  "style-src 'self' 'unsafe-inline'",
  "img-src 'self' data: blob:",
  "font-src 'self' data:",
  "connect-src 'self'",
  "frame-ancestors 'none'",
  "base-uri 'self'",
  "form-action 'self'",
  "object-src 'none'",
].join("; ");

const nextConfig = {
  // Parallel builds (several developers or test runs on one machine) each get their own output folder.
  distDir: process.env.NEXT_DIST_DIR || ".next",
  // knex pulls in drivers it never uses (pg, sqlite3, ...) when bundled; keep it and mysql2 external.
  serverExternalPackages: ["knex", "mysql2", "pdfkit", "nodemailer", "piscina", "smtp-server", "mailparser"],
  poweredByHeader: false,
  // scripts/test runs `tsc --noEmit` over the whole project (app, lib, db, tests) as its own step;
  // checking again inside the build would only repeat it.
  typescript: { ignoreBuildErrors: true },
  // The proxy (pages and their server actions) buffers request bodies; nothing Cairn accepts there is near 6 MB.
  experimental: { authInterrupts: true, proxyClientMaxBodySize: "6mb" },
  async headers() {
    return [
      {
        source: "/:path*",
        headers: [
          { key: "Content-Security-Policy", value: csp },
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
