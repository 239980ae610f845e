import type { Metadata, Viewport } from "next";
import localFont from "next/font/local";
import { connection } from "next/server";
import { Providers } from "./providers";
import "./globals.css";

// Atkinson Hyperlegible (Braille Institute) keeps 1/l/I and 0/O apart: dye codes, CAS numbers and
// coordinates are read aloud across the bench. Its files carry no Greek, so α, β, π*, εr come from Inter.
const body = localFont({
  src: "../node_modules/@fontsource-variable/atkinson-hyperlegible-next/files/atkinson-hyperlegible-next-latin-wght-normal.woff2",
  variable: "--font-body",
  display: "swap",
  weight: "200 800",
});
const code = localFont({
  src: "../node_modules/@fontsource-variable/atkinson-hyperlegible-mono/files/atkinson-hyperlegible-mono-latin-wght-normal.woff2",
  variable: "--font-code",
  display: "swap",
  weight: "200 800",
});
const greek = localFont({
  src: "../node_modules/@fontsource-variable/inter/files/inter-greek-wght-normal.woff2",
  variable: "--font-greek",
  display: "swap",
  weight: "100 900",
});

export const metadata: Metadata = {
  title: { default: "Solvatlas", template: "%s · Solvatlas" },
  description: "Calibrated colour records of dyes across solvents and acid/base conditions.",
};

export const viewport: Viewport = { width: "device-width", initialScale: 1 };

export default async function RootLayout({ children }: { children: React.ReactNode }) {
  // Rendered per request: the Content-Security-Policy nonce (proxy.ts) is new on every page.
  await connection();
  return (
    <html lang="en" className={`${body.variable} ${code.variable} ${greek.variable}`}>
      <body className="min-h-dvh font-sans antialiased">
        <Providers>{children}</Providers>
      </body>
    </html>
  );
}
