import { QueryProvider } from "@/components/ui/query-provider";

export default function EnsemblesLayout({ children }: { children: React.ReactNode }) {
  return <QueryProvider>{children}</QueryProvider>;
}
