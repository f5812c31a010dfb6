import type { Metadata, Viewport } from "next";
import localFont from "next/font/local";
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

export default function RootLayout({ children }: { children: ReactNode }) {
  return (
    <html lang="en" className={plex.variable}>
      <body className="flex min-h-screen flex-col font-sans">
        <div className="flex flex-1 flex-col">{children}</div>
        <LicensedDirectionFooter />
      </body>
    </html>
  );
}
