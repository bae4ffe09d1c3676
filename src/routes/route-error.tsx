import { isRouteErrorResponse, useRouteError, Link } from "react-router-dom";
import { ErrorPanel } from "@/components/ui/states";
import { ApiError } from "@/lib/api-error";

/**
 * Root error boundary: says what went wrong in words and offers a way back. The route areas' boundaries
 * (area-error.tsx) explain signed-out, no-access and not-found answers and pass everything else up to here.
 */
export function RouteError() {
  const error = useRouteError();
  let title = "Something went wrong";
  let message = "An unexpected error stopped this page. Reload to try again.";
  if (isRouteErrorResponse(error)) {
    title = error.status === 404 ? "Page not found" : `Error ${error.status}`;
    message = error.statusText || message;
  } else if (error instanceof ApiError) {
    title = error.status === 403 ? "Not allowed" : "The server could not answer";
    message = error.message;
  } else if (error instanceof Error) {
    message = error.message;
  }
  return (
    <ErrorPanel
      title={title}
      actions={
        <>
          <button type="button" onClick={() => window.location.reload()} className="rounded bg-accent px-3 py-1.5 text-white">Reload</button>
          <Link to="/" className="rounded border border-line px-3 py-1.5">Overview</Link>
        </>
      }
    >
      <p>{message}</p>
    </ErrorPanel>
  );
}
