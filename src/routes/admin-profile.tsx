import { useState } from "react";
import { useQuery } from "@tanstack/react-query";
import { Link, generatePath, useNavigate, useParams, useSearchParams } from "react-router-dom";
import { Card } from "@/components/ui/states";
import type { PrimeCache } from "@/app/page-loader";
import { pagePaths } from "@/app/page-paths";
import { QueryView } from "@/features/filters/components/query-view";
import { profileQueries } from "@/features/admin/profiles/api/profile-queries";
import { ProfileForm } from "@/features/admin/profiles/components/profile-form";
import { dateTimeInWords, kindLabels } from "@/features/imports/import-words";

const versionOf = (s: URLSearchParams) => {
  const v = Number(s.get("version"));
  return Number.isInteger(v) && v > 0 ? v : undefined;
};

// awaited: one profile, and a profile that does not exist reaches the area's error boundary before the page draws
export const primeCache: PrimeCache = (qc, { params, url }) => qc.ensureQueryData(profileQueries.detail(params.id ?? "", versionOf(url.searchParams)));

export function Component() {
  const id = useParams().id!;
  const [params] = useSearchParams();
  const version = versionOf(params);
  const q = useQuery(profileQueries.detail(id, version));
  const navigate = useNavigate();
  // a message about a save shows on the page of the profile it saved, and goes once another version is opened
  const here = `${id}|${version ?? "latest"}`;
  const [savedNote, setSaved] = useState<{ at: string; text: string } | null>(null);
  const saved = savedNote?.at === here ? savedNote.text : null;

  return (
    <div className="space-y-4">
      <div>
        <Link to={pagePaths.adminProfiles} className="text-sm text-accent underline">All profiles</Link>
        <h1 className="text-2xl font-bold">
          Profile <span className="font-mono">{id}</span>
        </h1>
      </div>
      {saved && (
        <p role="status" className="rounded border border-line bg-card px-3 py-2 text-sm">
          {saved}
        </p>
      )}
      <QueryView query={q} label="the profile">
        {(d) => {
          const old = d.version !== d.latestVersion;
          return (
            <>
              <p className="text-muted">
                Reads {kindLabels[d.profile.kind].toLowerCase()} · version {d.version}
                {old && <> of {d.latestVersion}: an older version, shown as it was (read only). <Link to={generatePath(pagePaths.adminProfile, { id })} className="text-accent underline">Open the latest</Link></>}
              </p>
              <Card>
                <ProfileForm
                  key={`${d.profile.id}-${d.version}`}
                  detail={d}
                  readOnly={old}
                  onSaved={(savedId, v, isNew) => {
                    setSaved({
                      at: `${savedId}|latest`,
                      text: isNew ? `Saved as a new profile, ${savedId}, version ${v}.` : `Saved as version ${v}. Files loaded from now on are read with it.`,
                    });
                    if (isNew || version !== undefined) navigate(generatePath(pagePaths.adminProfile, { id: savedId }));
                  }}
                />
              </Card>
              <Card title="Versions">
                <div className="overflow-x-auto">
                  <table className="w-full text-left text-sm" aria-label="Versions of the profile">
                    <thead className="text-muted">
                      <tr>
                        <th scope="col" className="border-b border-line px-2 py-1.5">Version</th>
                        <th scope="col" className="border-b border-line px-2 py-1.5">Saved by</th>
                        <th scope="col" className="border-b border-line px-2 py-1.5">When</th>
                        <th scope="col" className="border-b border-line px-2 py-1.5">Why</th>
                        <th scope="col" className="border-b border-line px-2 py-1.5 text-right">Loads read with it</th>
                      </tr>
                    </thead>
                    <tbody>
                      {d.history.map((h) => (
                        <tr key={h.version} className={h.version === d.version ? "bg-accent-soft/40" : ""}>
                          <td className="px-2 py-1.5">
                            <Link to={`${generatePath(pagePaths.adminProfile, { id })}?version=${h.version}`} className="text-accent underline">
                              {h.version}
                            </Link>
                          </td>
                          <td className="px-2 py-1.5">{h.savedBy === "defaults" ? "shipped with Ironledger" : h.savedBy}</td>
                          <td className="whitespace-nowrap px-2 py-1.5">{dateTimeInWords(h.savedAt)}</td>
                          <td className="px-2 py-1.5">{h.note ?? "—"}</td>
                          <td className="px-2 py-1.5 text-right tabular-nums">{h.batches.toLocaleString("en")}</td>
                        </tr>
                      ))}
                    </tbody>
                  </table>
                </div>
              </Card>
            </>
          );
        }}
      </QueryView>
    </div>
  );
}
