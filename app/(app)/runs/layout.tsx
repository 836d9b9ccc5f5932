import { QueryProvider } from "@/components/ui/query-provider";

export default function RunsLayout({ children }: { children: React.ReactNode }) {
  return <QueryProvider>{children}</QueryProvider>;
}
