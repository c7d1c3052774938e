import type { Metadata } from "next";
import localFont from "next/font/local";
import "./globals.css";

// Shipped with the app: the build machine has no network for hosted fonts.
const inter = localFont({
  src: "./fonts/inter-latin-wght-normal.woff2",
  variable: "--font-inter",
  display: "swap",
});

export const metadata: Metadata = {
  title: { default: "Partita", template: "%s · Partita" },
  description:
    "Measure shard heterogeneity and decide between local updates and large minibatches.",
};

export default function RootLayout({ children }: { children: React.ReactNode }) {
  return (
    <html lang="en" className={inter.variable}>
      <body className="min-h-screen font-sans">{children}</body>
    </html>
  );
}
