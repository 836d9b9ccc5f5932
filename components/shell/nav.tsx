"use client";
import Link from "next/link";
import { usePathname } from "next/navigation";

export type NavItem = { href: string; label: string };

export function Nav({ items }: { items: NavItem[] }) {
  const path = usePathname();
  return (
    <nav aria-label="Areas" className="flex flex-col gap-0.5">
      {items.map((i) => {
        const active = i.href === "/" ? path === "/" : path.startsWith(i.href);
        return (
          <Link key={i.href} href={i.href} aria-current={active ? "page" : undefined}
            className={`rounded-md px-3 py-1.5 text-sm ${active ? "bg-accent-soft text-accent-strong font-medium" : "text-ink-soft hover:bg-paper-sunken hover:text-ink"}`}>
            {i.label}
          </Link>
        );
      })}
    </nav>
  );
}
