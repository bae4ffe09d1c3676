import { useEffect, useRef, useState } from "react";
import { useQuery, useQueryClient } from "@tanstack/react-query";
import { Card, EmptyState, ErrorNotice, Skeleton } from "@/components/ui/states";
import type { PrimeCache } from "@/app/page-loader";
import { shopAdminQueries, useSaveShop } from "@/features/admin/shops/api/shop-admin-queries";
import { ShopForm } from "@/features/admin/shops/components/shop-form";
import { ShopTable } from "@/features/admin/shops/components/shop-table";
import { shopQueries } from "@/features/filters/api/shop-queries";
import type { AdminShop } from "@shared/schemas/shops-admin";

// awaited: a short list, and someone who is not an administrator reaches the area's error boundary
export const primeCache: PrimeCache = (qc) => qc.ensureQueryData(shopAdminQueries.list());

type Editing = { kind: "add" } | { kind: "edit"; shop: AdminShop } | null;

export function Component() {
  const q = useQuery(shopAdminQueries.list());
  const qc = useQueryClient();
  const [editing, setEditing] = useState<Editing>(null);
  const [saved, setSaved] = useState<string | null>(null);
  const save = useSaveShop(() => {
    // the shop pickers of the other pages name shops too
    void qc.invalidateQueries({ queryKey: shopQueries.all() });
    setEditing(null);
  });
  // the saved form is gone: the keyboard continues from the words saying so, not from the top of the page
  const status = useRef<HTMLParagraphElement>(null);
  const said = saved && !editing ? saved : null;
  useEffect(() => {
    if (said) status.current?.focus();
  }, [said]);
  const open = (e: Editing) => {
    save.reset();
    setSaved(null);
    setEditing(e);
  };

  return (
    <div className="space-y-4">
      <div className="flex flex-wrap items-end justify-between gap-3">
        <div>
          <h1 className="text-2xl font-bold">Shops</h1>
          <p className="text-muted">The shop register: each shop's name, place, climate and time zone, and the profile its exports use.</p>
        </div>
        <button type="button" onClick={() => open({ kind: "add" })} className="rounded bg-accent px-3 py-1.5 text-sm font-semibold text-white">
          Add a shop
        </button>
      </div>
      {/* always in the page, so that a screen reader hears the words when they come */}
      <p ref={status} role="status" tabIndex={-1} className={said ? "rounded border border-line bg-card px-3 py-2 text-sm outline-none" : "sr-only"}>
        {said}
      </p>
      {editing && q.data && (
        <Card>
          <ShopForm
            key={editing.kind === "edit" ? `edit-${editing.shop.code}` : "add"}
            shop={editing.kind === "edit" ? editing.shop : null}
            profiles={q.data.profiles}
            pending={save.isPending}
            error={save.error}
            onSave={(s) => save.mutate(s, { onSuccess: (shop) => setSaved(`Shop ${shop.code} (${shop.name}) is saved.`) })}
            onCancel={() => open(null)}
          />
        </Card>
      )}
      <Card>
        {q.isPending ? (
          <Skeleton />
        ) : q.isError ? (
          <ErrorNotice error={q.error} onRetry={() => q.refetch()} />
        ) : q.data.shops.length === 0 ? (
          <EmptyState title="No shops are registered yet">Add one here, or register a file with npm run etl -- shops register.</EmptyState>
        ) : (
          <ShopTable shops={q.data.shops} onEdit={(shop) => open({ kind: "edit", shop })} />
        )}
      </Card>
    </div>
  );
}
