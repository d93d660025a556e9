import type { Metadata, Viewport } from "next";
import { headers } from "next/headers";
import type { ReactNode } from "react";
import { demoAccountsExist } from "@/lib/server/demo-mode";
import "./globals.css";

export const metadata: Metadata = {
  title: "heatcheck",
  description: "Which quads to inspect before the next heat, from their own vibration baselines.",
  icons: { icon: "/icon.svg" },
};

export const viewport: Viewport = { width: "device-width", initialScale: 1 };

export default async function RootLayout({ children }: { children: ReactNode }) {
  // Reading the request makes every page render per request, so each gets its CSP nonce (proxy.ts).
  await headers();
  const demo = await demoAccountsExist();
  return (
    <html lang="en">
      <body>
        {demo ? (
          <section className="demo-banner" aria-label="demo server" data-testid="demo-banner">
            Demo server: the invented demo team&apos;s accounts exist and their passwords are
            published. Do not keep a real team&apos;s records here.
          </section>
        ) : null}
        {children}
      </body>
    </html>
  );
}
