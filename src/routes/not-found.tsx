import { Link, useLocation, useNavigate } from "react-router-dom";

export function Component() {
  const navigate = useNavigate();
  const location = useLocation();
  return (
    <div className="rounded-lg border border-line bg-card p-8" role="alert">
      <h1 className="text-2xl font-bold">Page not found</h1>
      <p className="mt-2 text-muted">There is no page at this address. It may have moved, or the link is incomplete.</p>
      <div className="mt-4 flex flex-wrap gap-3">
        {location.key !== "default" && (
          <button type="button" onClick={() => navigate(-1)} className="rounded bg-accent px-3 py-1.5 font-semibold text-white">
            Back to the previous page
          </button>
        )}
        <Link to="/" className="rounded border border-line px-3 py-1.5">
          Back to the overview
        </Link>
      </div>
    </div>
  );
}
