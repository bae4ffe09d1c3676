import { useQuery } from "@tanstack/react-query";
import { userQueries } from "@/features/admin/api/user-queries";
import { Card, EmptyState, ErrorNotice, Skeleton } from "@/components/ui/states";
import type { PrimeCache } from "@/app/page-loader";
import { roleLabels } from "@shared/roles";

// awaited: a short list, and someone who is not an administrator reaches the area's error boundary
export const primeCache: PrimeCache = (qc) => qc.ensureQueryData(userQueries.list());

export function Component() {
  const q = useQuery(userQueries.list());
  return (
    <div className="space-y-4">
      <h1 className="text-2xl font-bold">Users</h1>
      <p className="text-muted">Everyone who has signed in. Roles and shops come from the identity provider at each sign-in.</p>
      <Card>
        {q.isPending ? (
          <Skeleton />
        ) : q.isError ? (
          <ErrorNotice error={q.error} onRetry={() => q.refetch()} />
        ) : q.data.users.length === 0 ? (
          <EmptyState title="No one has signed in yet" />
        ) : (
          <table className="w-full text-left text-sm">
            <thead className="border-b border-line text-muted">
              <tr><th className="py-2">Name</th><th>Roles</th><th>Shops</th><th>Last sign-in</th></tr>
            </thead>
            <tbody>
              {q.data.users.map((u) => (
                <tr key={u.sub} className="border-b border-line/60">
                  <td className="py-2">{u.name}<div className="text-xs text-muted">{u.email}</div></td>
                  <td>{u.roles.map((r) => roleLabels[r]).join(", ")}</td>
                  <td>{u.shops.join(", ") || "All"}</td>
                  <td>{new Date(u.lastSeen).toLocaleString()}</td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
      </Card>
    </div>
  );
}
