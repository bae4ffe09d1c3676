import { useEffect, useRef, useState } from "react";
import { useQuery } from "@tanstack/react-query";
import { userQueries, useChangeUser, type UserChange } from "@/features/admin/api/user-queries";
import { UserAccessForm } from "@/features/admin/users/components/user-access-form";
import { meQueries } from "@/features/session/api/me-queries";
import { dateTimeInWords } from "@/features/imports/import-words";
import { Card, EmptyState, ErrorNotice, Skeleton } from "@/components/ui/states";
import type { PrimeCache } from "@/app/page-loader";
import { roleLabels } from "@shared/roles";
import { ACCESS_RULE, shopLimited, type AdminUser } from "@shared/schemas/admin";

// awaited: a short list, and someone who is not an administrator reaches the area's error boundary
export const primeCache: PrimeCache = (qc) => qc.ensureQueryData(userQueries.list());

const shopsOf = (u: AdminUser) => (shopLimited(u.roles) ? u.shops.join(", ") || "none" : "All");

function History({ sub }: { sub: string }) {
  const q = useQuery(userQueries.history(sub));
  if (q.isPending) return <Skeleton lines={2} label="Loading the changes" />;
  if (q.isError) return <ErrorNotice error={q.error} onRetry={() => q.refetch()} />;
  if (q.data.events.length === 0) return <p className="text-sm text-muted">No administrator has changed this user's access.</p>;
  return (
    <ol className="space-y-2 text-sm" aria-label="Changes to this user's access">
      {q.data.events.map((e, i) => (
        <li key={i} className="border-l-2 border-line pl-3">
          <span className="text-xs text-muted">{dateTimeInWords(e.at)}</span>
          <p>{e.sentence}</p>
        </li>
      ))}
    </ol>
  );
}

export function Component() {
  const q = useQuery(userQueries.list());
  const me = useQuery(meQueries.current());
  const change = useChangeUser();
  const [editing, setEditing] = useState<string | null>(null);
  const [said, setSaid] = useState<string | null>(null);
  const status = useRef<HTMLParagraphElement>(null);
  useEffect(() => {
    if (said) status.current?.focus();
  }, [said]);

  const open = (sub: string | null) => {
    change.reset();
    setSaid(null);
    setEditing(sub);
  };
  const act = (c: UserChange, words: (u: AdminUser) => string, close = false) =>
    change.mutate(c, {
      onSuccess: (u) => {
        setSaid(words(u));
        if (close) setEditing(null);
      },
    });
  const user = q.data?.users.find((u) => u.sub === editing) ?? null;
  const self = !!user && me.data?.sub === user.sub;

  return (
    <div className="space-y-4">
      <div>
        <h1 className="text-2xl font-bold">Users</h1>
        <p className="text-muted">Everyone who has signed in, with the roles and shops in force and when they last signed in.</p>
      </div>
      <div className="rounded border border-line bg-card px-3 py-2 text-sm">
        <h2 className="font-semibold">Who decides a user's access</h2>
        <p>{ACCESS_RULE}</p>
        <p className="text-muted">A deactivated user's sessions end at once, and their sign-ins are refused until an administrator reactivates them.</p>
      </div>
      <p ref={status} role="status" tabIndex={-1} className={said ? "rounded border border-line bg-card px-3 py-2 text-sm outline-none" : "sr-only"}>
        {said}
      </p>
      {user && q.data && (
        <Card>
          <div className="space-y-5">
            <UserAccessForm
              key={user.sub}
              user={user}
              shops={q.data.shops}
              self={self}
              pending={change.isPending}
              error={change.error}
              onSave={(access) => act({ kind: "access", sub: user.sub, access }, (u) => `${u.name}'s access is saved: ${u.roles.map((r) => roleLabels[r]).join(", ")}; shops ${shopsOf(u)}.`, true)}
              onCancel={() => open(null)}
            />
            <div className="space-y-2 border-t border-line pt-3 text-sm">
              <p>
                {user.source === "ironledger"
                  ? `Set in Ironledger by ${user.accessSetBy} on ${dateTimeInWords(user.accessSetAt!)}. The provider gives: ${user.provider.roles.map((r) => roleLabels[r]).join(", ") || "no role"}; shops ${user.provider.shops.join(", ") || "none"}.`
                  : "From the identity provider's claims at the last sign-in."}
              </p>
              <div className="flex flex-wrap gap-2">
                {user.source === "ironledger" && (
                  <button type="button" disabled={change.isPending} onClick={() => act({ kind: "provider", sub: user.sub }, (u) => `${u.name} has the identity provider's roles and shops again.`)} className="rounded border border-slate bg-white px-3 py-1.5 text-sm">
                    Use the provider's again
                  </button>
                )}
                {self ? (
                  <p className="text-xs text-muted">You cannot deactivate your own account.</p>
                ) : user.deactivatedAt ? (
                  <button type="button" disabled={change.isPending} onClick={() => act({ kind: "reactivate", sub: user.sub }, (u) => `${u.name} is reactivated and may sign in again.`)} className="rounded border border-slate bg-white px-3 py-1.5 text-sm">
                    Reactivate
                  </button>
                ) : (
                  <button type="button" disabled={change.isPending} onClick={() => act({ kind: "deactivate", sub: user.sub }, (u) => `${u.name} is deactivated: their sessions ended and their sign-ins are refused.`)} className="rounded border border-alert bg-white px-3 py-1.5 text-sm text-alert">
                    Deactivate
                  </button>
                )}
              </div>
            </div>
            <section className="border-t border-line pt-3">
              <h3 className="mb-2 font-semibold">Changes</h3>
              <History sub={user.sub} />
            </section>
          </div>
        </Card>
      )}
      <Card>
        {q.isPending ? (
          <Skeleton />
        ) : q.isError ? (
          <ErrorNotice error={q.error} onRetry={() => q.refetch()} />
        ) : q.data.users.length === 0 ? (
          <EmptyState title="No one has signed in yet" />
        ) : (
          // relative: the screen-reader-only spans in the cells are absolutely placed and would otherwise widen the page
          <div className="relative overflow-x-auto">
            <table className="w-full text-left text-sm" aria-label="Users">
              <thead className="border-b border-line text-muted">
                <tr>
                  <th scope="col" className="px-2 py-2"><span className="sr-only">Edit</span></th>
                  <th scope="col" className="px-2">Name</th>
                  <th scope="col" className="px-2">Roles</th>
                  <th scope="col" className="px-2">Shops</th>
                  <th scope="col" className="px-2">Set by</th>
                  <th scope="col" className="px-2">Status</th>
                  <th scope="col" className="whitespace-nowrap px-2">Last sign-in</th>
                </tr>
              </thead>
              <tbody>
                {q.data.users.map((u) => (
                  <tr key={u.sub} className="border-b border-line/60 align-top">
                    <td className="px-2 py-2">
                      <button type="button" onClick={() => open(u.sub)} className="rounded border border-slate bg-white px-2 py-1 text-xs font-semibold">
                        Edit<span className="sr-only"> access of {u.name}</span>
                      </button>
                    </td>
                    <td className="px-2 py-2">{u.name}<div className="text-xs text-muted">{u.email}</div></td>
                    <td className="px-2 py-2">{u.roles.map((r) => roleLabels[r]).join(", ")}</td>
                    <td className="px-2 py-2">{shopsOf(u)}</td>
                    <td className="px-2 py-2">{u.source === "ironledger" ? "Ironledger" : "Provider"}</td>
                    <td className="px-2 py-2">{u.deactivatedAt ? `Deactivated ${dateTimeInWords(u.deactivatedAt)}` : "Active"}</td>
                    <td className="whitespace-nowrap px-2 py-2">{dateTimeInWords(u.lastSeen)}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        )}
      </Card>
    </div>
  );
}
