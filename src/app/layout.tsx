import { NavLink, Outlet } from "react-router-dom";
import { useSuspenseQuery } from "@tanstack/react-query";
import { Suspense, useState } from "react";
import { meQueries } from "@/features/session/api/me-queries";
import { navFor } from "./navigation";
import { pagePaths } from "./page-paths";
import { LogoMark } from "@/components/logo-mark";
import { Skeleton } from "@/components/ui/states";
import { SignInScreen } from "@/routes/sign-in";
import { roleLabels } from "@shared/roles";
import type { Me } from "@shared/schemas/me";

function UserMenu({ me }: { me: Me }) {
  const [open, setOpen] = useState(false);
  return (
    <div className="relative">
      <button
        type="button"
        aria-haspopup="menu"
        aria-expanded={open}
        onClick={() => setOpen((o) => !o)}
        className="flex items-center gap-2 rounded-full border border-white/20 px-3 py-1 text-sm text-paper hover:bg-white/10"
      >
        <span className="grid h-6 w-6 place-items-center rounded-full bg-ochre text-xs font-bold text-ink">
          {me.name.slice(0, 1)}
        </span>
        <span>{me.name}</span>
      </button>
      {open && (
        <div role="menu" className="absolute right-0 z-20 mt-2 w-64 max-sm:left-0 max-sm:right-auto rounded-lg border border-line bg-card p-3 text-sm text-ink shadow-lg">
          <p className="font-semibold">{me.name}</p>
          <p className="text-muted">{me.roles.map((r) => roleLabels[r]).join(", ")}</p>
          <p className="text-muted">
            {me.scope.kind === "all" ? "All shops" : `Shops: ${me.scope.shops.join(", ") || "none"}`}
          </p>
          <NavLink to={pagePaths.account} role="menuitem" onClick={() => setOpen(false)} className="mt-3 block rounded border border-line px-3 py-1.5 text-center hover:bg-paper">
            Your account and weekly digest
          </NavLink>
          <form method="post" action="/auth/logout" className="mt-2">
            <button type="submit" role="menuitem" className="w-full rounded bg-slate px-3 py-1.5 text-paper">
              Sign out
            </button>
          </form>
        </div>
      )}
    </div>
  );
}

function Shell() {
  const { data: me } = useSuspenseQuery(meQueries.current());
  if (!me) return <SignInScreen />;
  return (
    <div className="min-h-screen">
      <header className="bg-slate text-paper">
        <div className="mx-auto flex max-w-7xl flex-wrap items-center gap-x-6 gap-y-2 px-4 py-2.5">
          <NavLink to="/" className="flex items-center gap-2 font-bold tracking-wide">
            <LogoMark />
            <span>Ironledger</span>
          </NavLink>
          <nav aria-label="Main" className="flex flex-1 flex-wrap gap-1">
            {navFor(me.roles).map((n) => (
              <NavLink
                key={n.to}
                to={n.to}
                end={n.to === "/"}
                className={({ isActive }) =>
                  `rounded px-3 py-1.5 text-sm ${isActive ? "bg-paper text-ink" : "text-paper/85 hover:bg-white/10"}`
                }
              >
                {n.label}
              </NavLink>
            ))}
          </nav>
          <UserMenu me={me} />
        </div>
      </header>
      <main className="mx-auto max-w-7xl px-4 py-6">
        <Suspense fallback={<Skeleton lines={6} />}>
          <Outlet />
        </Suspense>
      </main>
    </div>
  );
}

export function Layout() {
  return (
    <Suspense fallback={<div className="p-8"><Skeleton /></div>}>
      <Shell />
    </Suspense>
  );
}
