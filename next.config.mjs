/** @type {import('next').NextConfig} */
const nextConfig = {
  reactStrictMode: true,
  poweredByHeader: false,
  // Native / large server-only packages stay outside the server bundle.
  serverExternalPackages: ["@libsql/client", "libsql", "geotiff", "pngjs"],
  experimental: {
    // forbidden() renders app/forbidden.tsx with status 403 (used by requirePageViewer).
    authInterrupts: true,
    // Server actions carry CSV uploads; the intake states its own limits and
    // checks them again on the server.
    serverActions: { bodySizeLimit: "60mb" },
  },
  async headers() {
    return [
      {
        source: "/:path*",
        headers: [
          { key: "X-Content-Type-Options", value: "nosniff" },
          { key: "Referrer-Policy", value: "strict-origin-when-cross-origin" },
          { key: "X-Frame-Options", value: "DENY" },
        ],
      },
    ];
  },
};

export default nextConfig;
