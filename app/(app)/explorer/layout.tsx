import { QueryProvider } from "@/components/ui/query-provider";

export default function ExplorerLayout({ children }: { children: React.ReactNode }) {
  return <QueryProvider>{children}</QueryProvider>;
}
