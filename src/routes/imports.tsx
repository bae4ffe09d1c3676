import { useQuery, useSuspenseQuery } from "@tanstack/react-query";
import { useSearchParams } from "react-router-dom";
import { Card } from "@/components/ui/states";
import { QueryView } from "@/features/filters/components/query-view";
import { shopQueries } from "@/features/filters/api/shop-queries";
import { meQueries } from "@/features/session/api/me-queries";
import { importQueries } from "@/features/imports/api/import-queries";
import { batchQueries } from "@/features/imports/api/batch-queries";
import { ImportDropZone } from "@/features/imports/components/drop-zone";
import { ImportCard } from "@/features/imports/components/import-card";
import { BatchTable } from "@/features/imports/components/batch-table";
import type { PrimeCache } from "@/app/page-loader";

// the recent uploads are awaited (a short list, and a refusal reaches the area's error boundary); the load
// history below them is prefetched without waiting
export const primeCache: PrimeCache = (qc, { url }) => {
  void qc.prefetchQuery(batchQueries.list(url.searchParams.get("shop") ?? ""));
  return qc.ensureQueryData(importQueries.list());
};

function ShopFilter({ shop, onShop }: { shop: string; onShop: (shop: string) => void }) {
  const shops = useQuery(shopQueries.list());
  return (
    <label className="flex items-center gap-2 text-sm">
      Shop
      <select value={shop} onChange={(e) => onShop(e.target.value)} className="max-w-48 rounded border border-line bg-white px-2 py-1">
        <option value="">Every shop</option>
        {/* a shop in the URL but not (yet) in the list stays choosable */}
        {shop && !shops.data?.shops.some((s) => s.code === shop) && <option value={shop}>{shop}</option>}
        {shops.data?.shops.map((s) => <option key={s.code} value={s.code}>{s.code} · {s.name}</option>)}
      </select>
    </label>
  );
}

export function Component() {
  const { data: me } = useSuspenseQuery(meQueries.current());
  const [params, setParams] = useSearchParams();
  const shop = params.get("shop") ?? "";
  const imports = useQuery(importQueries.list());
  const batches = useQuery(batchQueries.list(shop));
  const groupWide = me?.scope.kind === "all";
  const setShop = (next: string) => {
    const p = new URLSearchParams(params);
    if (next) p.set("shop", next);
    else p.delete("shop");
    setParams(p, { replace: true });
  };

  return (
    <div className="space-y-6">
      <div>
        <h1 className="text-2xl font-bold">Imports</h1>
        <p className="text-muted">
          Feed the warehouse with your shops' exports. Each file is checked in full first and shown as it would land; load it when the preview looks right.
          {me?.scope.kind === "shops" && ` You can load rows of your shops only (${me.scope.shops.join(", ") || "none"}).`}
        </p>
      </div>

      <ImportDropZone />

      <section aria-labelledby="recent-uploads" className="space-y-3">
        <h2 id="recent-uploads" className="text-lg font-semibold">Recent uploads</h2>
        <QueryView
          query={imports}
          label="uploads"
          lines={4}
          isEmpty={(d) => d.imports.length === 0}
          emptyTitle="Nothing uploaded yet"
          emptyText="Drop an export above, or choose files, to check it."
        >
          {(d) => (
            <ul className="space-y-4">
              {d.imports.map((imp) => <li key={imp.id}><ImportCard initial={imp} /></li>)}
            </ul>
          )}
        </QueryView>
      </section>

      <Card title="Load history" actions={groupWide ? <ShopFilter shop={shop} onShop={setShop} /> : undefined}>
        <QueryView
          query={batches}
          label="load history"
          lines={6}
          isEmpty={(d) => d.batches.length === 0}
          emptyTitle="No loads yet"
          emptyText={shop ? `No export of shop ${shop} has been loaded.` : "No export has been loaded in the shops you can see."}
        >
          {(d) => <BatchTable batches={d.batches} />}
        </QueryView>
      </Card>
    </div>
  );
}
