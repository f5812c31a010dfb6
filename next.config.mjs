/** @type {import('next').NextConfig} */

// Headers on every response; the content security policy itself is set per request in proxy.ts
// (it carries a nonce), with a strict one here for the static files that proxy.ts skips.
const common = [
  { key: "X-Content-Type-Options", value: "nosniff" },
  { key: "X-Frame-Options", value: "DENY" },
  { key: "Referrer-Policy", value: "same-origin" },
  { key: "Permissions-Policy", value: "camera=(), microphone=(), geolocation=(), payment=()" },
  { key: "Cross-Origin-Opener-Policy", value: "same-origin" },
];

const nextConfig = {
  poweredByHeader: false,
  reactStrictMode: true,
  experimental: { authInterrupts: true },
  // The app build checks the app's own code; scripts and tests are checked by `npm run typecheck`.
  typescript: { tsconfigPath: "tsconfig.build.json" },
  serverExternalPackages: ["pg", "bcryptjs", "exceljs", "@lhncbc/ucum-lhc"],
  // The content security policy has no 'unsafe-eval': nothing in the browser bundle may probe for
  // eval (a refused probe is still reported as a violation). @stdlib's continued fractions ask at
  // load whether generators parse, through eval; in the browser the answer is always yes.
  turbopack: {
    resolveAlias: {
      "@stdlib/assert-has-generator-support": { browser: "./lib/browser/has-generator-support.cjs" },
    },
  },
  async headers() {
    return [
      { source: "/:path*", headers: common },
      {
        source: "/:prefix(_next/static|_next/image|fonts)/:path*",
        headers: [{ key: "Content-Security-Policy", value: "default-src 'none'; style-src 'self'; font-src 'self'; frame-ancestors 'none'" }],
      },
    ];
  },
};

export default nextConfig;
