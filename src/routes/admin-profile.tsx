import { VersionHistory } from "@/components/version-history";
import { useState } from "react";
import { useQuery } from "@tanstack/react-query";
import { Link, generatePath, useNavigate, useParams, useSearchParams } from "react-router-dom";
import { Card } from "@/components/ui/states";
import type { PrimeCache } from "@/app/page-loader";
import { pagePaths } from "@/app/page-paths";
import { QueryView } from "@/features/filters/components/query-view";
import { profileQueries } from "@/features/admin/profiles/api/profile-queries";
import { ProfileForm } from "@/features/admin/profiles/components/profile-form";
import { kindLabels } from "@/features/imports/import-words";

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
                <VersionHistory label="Versions of the profile" history={d.history} current={d.version} hrefOf={(v) => `${generatePath(pagePaths.adminProfile, { id })}?version=${v}`} extra={[{ header: "Loads read with it", cell: (h) => h.batches.toLocaleString("en"), numeric: true }]} />
              </Card>
            </>
          );
        }}
      </QueryView>
    </div>
  );
}
