"use client";
import { useState } from "react";
import { QueryClient, QueryClientProvider } from "@tanstack/react-query";

/** One TanStack Query client per browser tab, for the pages that fetch from the API in the client. */
export function QueryProvider({ children }: { children: React.ReactNode }) {
  // created in state, not at module level, so server renders never share a cache between requests
  const [client] = useState(() => new QueryClient({
    defaultOptions: { queries: { staleTime: 1_000, retry: 1, refetchOnWindowFocus: false } },
  }));
  return <QueryClientProvider client={client}>{children}</QueryClientProvider>;
}
