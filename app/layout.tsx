import type { Metadata, Viewport } from "next";
import localFont from "next/font/local";
import { headers } from "next/headers";
import type { ReactNode } from "react";
import { LicensedDirectionFooter } from "@/components/shell/licensed-direction-footer";
import "./globals.css";

const plex = localFont({
  src: [
    { path: "./fonts/plex-sans-latin.woff2", weight: "100 700", style: "normal" },
    { path: "./fonts/plex-sans-latin-ext.woff2", weight: "100 700", style: "normal" },
  ],
  variable: "--font-plex",
  display: "swap",
});

export const metadata: Metadata = {
  title: { default: "Bellwether", template: "%s · Bellwether" },
  description: "Reference intervals for the clinical laboratory: establish, sign off, score.",
};

export const viewport: Viewport = { width: "device-width", initialScale: 1 };

/**
 * Zod compiles faster object parsers with `new Function` when a probe says it may; under the
 * content security policy (no 'unsafe-eval') the browser refuses the probe and reports a violation.
 * This runs before any bundle and tells zod not to try (`z.config({ jitless: true })` would come
 * too late: the probe runs when a schema is created, as its module loads). zod reads its settings
 * from `globalThis.__zod_globalConfig`; tests/lib/zod-jitless.test.ts holds zod to that.
 */
const ZOD_JITLESS = "globalThis.__zod_globalConfig=Object.assign(globalThis.__zod_globalConfig||{},{jitless:true});";

export default async function RootLayout({ children }: { children: ReactNode }) {
  // proxy.ts gives each page request a nonce; Next puts it on its own scripts, this one needs it too.
  const nonce = (await headers()).get("x-nonce") ?? undefined;
  return (
    <html lang="en" className={plex.variable}>
      <head>
        <script nonce={nonce} suppressHydrationWarning dangerouslySetInnerHTML={{ __html: ZOD_JITLESS }} />
      </head>
      <body className="flex min-h-screen flex-col font-sans">
        <div className="flex flex-1 flex-col">{children}</div>
        <LicensedDirectionFooter />
      </body>
    </html>
  );
}
