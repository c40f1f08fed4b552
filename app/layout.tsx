import type { Metadata, Viewport } from "next";
import "@fontsource/atkinson-hyperlegible/400.css";
import "@fontsource/atkinson-hyperlegible/700.css";
import "./globals.css";

export const metadata: Metadata = {
  title: { default: "Corvane", template: "%s · Corvane" },
  description: "Ward-side review of beat-to-beat heart-rate complexity trends. Decision support only.",
  robots: { index: false, follow: false },
};

export const viewport: Viewport = { colorScheme: "dark", themeColor: "#12161d" };

export default function RootLayout({ children }: { children: React.ReactNode }) {
  return (
    <html lang="en">
      <body className="min-h-screen">
        <a href="#main" className="sr-only focus:not-sr-only focus:absolute focus:left-2 focus:top-2 focus:z-50 btn-primary">
          Skip to main content
        </a>
        {children}
      </body>
    </html>
  );
}
