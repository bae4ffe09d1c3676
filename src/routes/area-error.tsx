import { useQuery } from "@tanstack/react-query";
import { Link, useLocation, useNavigate, useRouteError } from "react-router-dom";
import { ErrorPanel } from "@/components/ui/states";
import { isPageStatus } from "@/lib/api-error";
import { PageRefused } from "@/app/page-loader";
import { homeFor, navFor, pageAccess } from "@/app/navigation";
import { meQueries } from "@/features/session/api/me-queries";
import { apiPaths } from "@shared/api-paths";
import { roleLabels, type Role } from "@shared/roles";

/** How a route area names itself to someone it turns away, and where it sends them instead. */
export interface AreaWords {
  /** what the area holds, as it reads after "You do not have access to" */
  subject: string;
  /** the area's list, offered when something in it was not found */
  list?: { to: string; label: string };
}

const listOf = (roles: readonly Role[]) => {
  const words = roles.map((r) => roleLabels[r]);
  return words.length < 2 ? words.join("") : `${words.slice(0, -1).join(", ")} and ${words[words.length - 1]}`;
};

/** The way back: the previous page when there is one in this tab, and the role's home. */
function WayBack({ roles, extra }: { roles: readonly Role[]; extra?: { to: string; label: string } }) {
  const navigate = useNavigate();
  const location = useLocation();
  const home = homeFor(roles);
  // React Router marks the first entry of a tab's history "default": there is no page of ours to go back to
  const hasPrevious = location.key !== "default";
  return (
    <>
      {hasPrevious && (
        <button type="button" onClick={() => navigate(-1)} className="rounded bg-accent px-3 py-1.5 font-semibold text-white">
          Back to the previous page
        </button>
      )}
      {extra && (
        <Link to={extra.to} className="rounded border border-line px-3 py-1.5">
          {extra.label}
        </Link>
      )}
      <Link to={home.to} className="rounded border border-line px-3 py-1.5">
        Your home page ({home.label})
      </Link>
    </>
  );
}

/** The pages a role can use, as links. */
function YourPages({ roles }: { roles: readonly Role[] }) {
  const pages = navFor(roles);
  return (
    <nav aria-label="Your pages">
      <p className="text-ink">As {listOf(roles)} you can use:</p>
      <ul className="mt-1 flex flex-wrap gap-2">
        {pages.map((p) => (
          <li key={p.to}>
            <Link to={p.to} className="inline-block rounded border border-line px-2 py-1 text-sm text-accent hover:bg-paper">
              {p.label}
            </Link>
          </li>
        ))}
      </ul>
    </nav>
  );
}

/**
 * The error boundary of one route area (analytics, repairs, benchmarks, claims, administration). It explains
 * the answers a retry cannot change, with the way back instead of a retry: a page the role does not serve (and
 * the pages it does), signed out (sign in again), no access, not found. Anything else is rethrown, so the root
 * boundary reports it and offers a reload.
 */
export function AreaError({ subject, list }: AreaWords) {
  const error = useRouteError();
  const location = useLocation();
  const me = useQuery(meQueries.current()).data;
  const roles: readonly Role[] = me?.roles ?? [];
  if (error instanceof PageRefused) {
    const page = pageAccess[error.page];
    return (
      <ErrorPanel title="Not one of your pages" actions={<WayBack roles={error.roles} />}>
        <p className="text-ink">You do not have access to {subject}.</p>
        <p>
          This page ({page.title.charAt(0).toLowerCase() + page.title.slice(1)}) serves the {listOf(page.roles)} {page.roles.length === 1 ? "role" : "roles"}. If you need it, ask for the role on your group account.
        </p>
        <YourPages roles={error.roles} />
      </ErrorPanel>
    );
  }
  if (!isPageStatus(error)) throw error;
  const requestId = error.requestId && <p className="text-xs">Request id {error.requestId}</p>;
  if (error.status === 401) {
    return (
      <ErrorPanel title="You are signed out" actions={<a href={apiPaths.login(location.pathname + location.search)} className="rounded bg-accent px-3 py-1.5 font-semibold text-white">Sign in</a>}>
        <p>Your session has ended. Sign in again to come back to this page.</p>
      </ErrorPanel>
    );
  }
  if (error.status === 403) {
    return (
      <ErrorPanel title="No access" actions={<WayBack roles={roles} />}>
        <p className="text-ink">You do not have access to {subject}.</p>
        <p>{error.message}</p>
        <p>Your role or your shops do not open this. If you need it, ask for the role on your group account.</p>
        {roles.length > 0 && <YourPages roles={roles} />}
        {requestId}
      </ErrorPanel>
    );
  }
  return (
    <ErrorPanel title="Not found" actions={<WayBack roles={roles} extra={list} />}>
      <p className="text-ink">{error.message}</p>
      <p>The link may be old, or what it pointed to is outside the shops you can see.</p>
      {requestId}
    </ErrorPanel>
  );
}
