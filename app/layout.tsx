import type { Metadata, Viewport } from "next";
import { connection } from "next/server";
import "@fontsource/inter/400.css";
import "@fontsource/inter/600.css";
import "@fontsource/inter/700.css";
import "@fontsource/jetbrains-mono/400.css";
import "@fontsource/jetbrains-mono/700.css";
import "./globals.css";

export const metadata: Metadata = {
  title: { default: "Grindfade", template: "%s · Grindfade" },
  description: "Valve lapping by ear, measured: seat records, clearance sheets and sign-off for cylinder-head work.",
};

export const viewport: Viewport = {
  width: "device-width",
  initialScale: 1,
  themeColor: "#1c1917",
};

export default async function RootLayout({ children }: { children: React.ReactNode }) {
  // Every page is rendered per request: its scripts carry the nonce of that response's content
  // security policy (set in proxy.ts), so nothing may be served as a prebuilt static page.
  await connection();
  return (
    <html lang="en">
      <body className="min-h-dvh font-sans antialiased">{children}</body>
    </html>
  );
}
