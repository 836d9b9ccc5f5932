import Link from "next/link";
import { pageIdentity } from "@/lib/auth/page-identity";
import { Nav, type NavItem } from "@/components/shell/nav";
import { Logo } from "@/components/shell/logo";
import { SignOutButton } from "@/components/shell/sign-out-button";

export const dynamic = "force-dynamic";

export default async function AppLayout({ children }: { children: React.ReactNode }) {
  const who = await pageIdentity();
  const items: NavItem[] = [
    { href: "/", label: "Overview" },
    { href: "/ensembles", label: "Ensembles" },
    { href: "/explorer", label: "Explorer" },
    { href: "/archive", label: "Archive" },
    { href: "/manuscripts", label: "Manuscripts" },
    { href: "/allocations", label: "Allocations" },
    { href: "/planner", label: "Planner" },
    { href: "/clusters", label: "Clusters" },
    ...(who.role === "pi" || who.role === "admin" ? [{ href: "/audit", label: "Audit" }] : []),
    ...(who.role === "admin" ? [{ href: "/people", label: "People" }, { href: "/mailbox", label: "Mailbox" }] : []),
  ];
  return (
    <div className="min-h-screen flex">
      <aside className="w-rail shrink-0 border-r border-line bg-paper-sunken/60 px-3 py-4 flex flex-col gap-6">
        <Link href="/" className="px-3"><Logo /></Link>
        <Nav items={items} />
        <div className="mt-auto px-3 text-xs text-ink-soft space-y-1">
          <Link href="/account" className="block font-medium text-ink hover:underline" data-testid="whoami">{who.name}</Link>
          <div>{who.email}</div>
          <div>role: <span className="font-medium">{who.role}</span></div>
          <SignOutButton />
        </div>
      </aside>
      <main className="flex-1 min-w-0 px-8 py-6 max-w-6xl">{children}</main>
    </div>
  );
}
