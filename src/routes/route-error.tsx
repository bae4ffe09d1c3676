import { isRouteErrorResponse, useRouteError, Link } from "react-router-dom";
import { ApiError } from "@/lib/api-error";

/** Root error boundary: says what went wrong in words and offers a way back. */
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
    <div className="mx-auto mt-16 max-w-lg rounded-lg border border-line bg-card p-8" role="alert">
      <h1 className="text-xl font-bold">{title}</h1>
      <p className="mt-2 text-muted">{message}</p>
      <div className="mt-4 flex gap-3">
        <button type="button" onClick={() => window.location.reload()} className="rounded bg-accent px-3 py-1.5 text-white">Reload</button>
        <Link to="/" className="rounded border border-line px-3 py-1.5">Overview</Link>
      </div>
    </div>
  );
}
