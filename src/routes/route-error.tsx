import { isRouteErrorResponse, useRouteError, Link, useLocation, useNavigate } from "react-router-dom";
import { ErrorPanel } from "@/components/ui/states";
import { ApiError, isRetryable } from "@/lib/api-error";

/**
 * Root error boundary: says what went wrong in words and offers a way back. The route areas' boundaries
 * (area-error.tsx) explain signed-out, no-access and not-found answers and pass everything else up to here.
 * A reload is offered only where it can help (network, 5xx, an unexpected failure); a refusal or a page that
 * is not there gets the way back instead.
 */
export function RouteError() {
  const error = useRouteError();
  const navigate = useNavigate();
  const location = useLocation();
  let title = "Something went wrong";
  let message = "An unexpected error stopped this page. Reload to try again.";
  let retry = true;
  if (isRouteErrorResponse(error)) {
    title = error.status === 404 ? "Page not found" : `Error ${error.status}`;
    message = error.status === 404 ? "There is no page at this address. It may have moved, or the link is incomplete." : error.statusText || message;
    retry = error.status >= 500;
  } else if (error instanceof ApiError) {
    title = error.status === 403 ? "Not allowed" : error.status === 404 ? "Not found" : "The server could not answer";
    message = error.message;
    retry = isRetryable(error);
  } else if (error instanceof Error) {
    message = error.message;
  }
  return (
    <ErrorPanel
      title={title}
      actions={
        <>
          {retry ? (
            <button type="button" onClick={() => window.location.reload()} className="rounded bg-accent px-3 py-1.5 text-white">Reload</button>
          ) : (
            location.key !== "default" && (
              <button type="button" onClick={() => navigate(-1)} className="rounded bg-accent px-3 py-1.5 text-white">Back to the previous page</button>
            )
          )}
          <Link to="/" className="rounded border border-line px-3 py-1.5">Overview</Link>
        </>
      }
    >
      <p>{message}</p>
    </ErrorPanel>
  );
}
