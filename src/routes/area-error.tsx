import { Link, useLocation, useRouteError } from "react-router-dom";
import { ErrorPanel } from "@/components/ui/states";
import { isPageStatus } from "@/lib/api-error";
import { pagePaths } from "@/app/page-paths";
import { apiPaths } from "@shared/api-paths";

/** How a route area names itself to someone it turns away, and where it sends them instead. */
export interface AreaWords {
  /** what the area holds, as it reads after "You do not have access to" */
  subject: string;
  /** the area's list, offered when something in it was not found */
  list?: { to: string; label: string };
}

/**
 * The error boundary of one route area (analytics, repairs, benchmarks, claims, administration). It explains
 * the answers a retry cannot change: signed out (sign in again), no access, not found. Anything else is
 * rethrown, so the root boundary reports it and offers a reload.
 */
export function AreaError({ subject, list }: AreaWords) {
  const error = useRouteError();
  const location = useLocation();
  if (!isPageStatus(error)) throw error;
  const link = (to: string, label: string) => <Link to={to} className="rounded border border-line px-3 py-1.5">{label}</Link>;
  const overview = link(pagePaths.overview, "Overview");
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
      <ErrorPanel title="No access" actions={overview}>
        <p className="text-ink">You do not have access to {subject}.</p>
        <p>Your role does not open these pages. If you need them, ask for the role on your group account.</p>
        {requestId}
      </ErrorPanel>
    );
  }
  return (
    <ErrorPanel title="Not found" actions={<>{list && link(list.to, list.label)}{overview}</>}>
      <p className="text-ink">{error.message}</p>
      <p>The link may be old, or what it pointed to is outside the shops you can see.</p>
      {requestId}
    </ErrorPanel>
  );
}
