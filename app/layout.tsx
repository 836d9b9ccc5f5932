import type { Metadata } from "next";
import "./globals.css";
import { sans, mono } from "./fonts";

export const metadata: Metadata = {
  title: { default: "Ergodex", template: "%s · Ergodex" },
  description: "Job broker and results archive for Monte Carlo ensembles",
};

export default function RootLayout({ children }: { children: React.ReactNode }) {
  return (
    <html lang="en" className={`${sans.variable} ${mono.variable}`}>
      <body>{children}</body>
    </html>
  );
}
