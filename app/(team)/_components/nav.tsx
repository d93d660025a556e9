"use client";

import { signOut } from "next-auth/react";
import Link from "next/link";
import { usePathname } from "next/navigation";

const LINKS = [
  { href: "/", label: "Inspection queue" },
  { href: "/fleet", label: "Fleet" },
  { href: "/upload", label: "Upload" },
  { href: "/parts", label: "Parts" },
  { href: "/events", label: "Events" },
  { href: "/team", label: "Team" },
];

export interface NavProps {
  teamName: string;
  userName: string;
  role: string;
}

export function Nav({ teamName, userName, role }: NavProps) {
  const path = usePathname();
  const current = (href: string) =>
    (href === "/" ? path === "/" : path.startsWith(href)) ||
    (href === "/fleet" && path.startsWith("/airframes"));
  return (
    <header className="topbar">
      <Link href="/" className="brand">
        <svg viewBox="0 0 32 32" aria-hidden="true">
          <path
            d="M3 20h5l3-10 4 16 4-20 3 14h7"
            fill="none"
            stroke="#f4b63f"
            strokeWidth="2.6"
            strokeLinejoin="round"
            strokeLinecap="round"
          />
        </svg>
        heatcheck
      </Link>
      <nav aria-label="main">
        {LINKS.map((l) => (
          <Link key={l.href} href={l.href} aria-current={current(l.href) ? "page" : undefined}>
            {l.label}
          </Link>
        ))}
      </nav>
      <div className="who">
        <span>
          {teamName} · {userName} ({role})
        </span>
        <button type="button" onClick={() => void signOut({ callbackUrl: "/signin" })}>
          Sign out
        </button>
      </div>
    </header>
  );
}
