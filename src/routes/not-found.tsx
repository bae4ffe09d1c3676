import { Link } from "react-router-dom";

export function Component() {
  return (
    <div className="rounded-lg border border-line bg-card p-8">
      <h1 className="text-2xl font-bold">Page not found</h1>
      <p className="mt-2 text-muted">There is no page at this address. It may have moved, or the link is incomplete.</p>
      <Link to="/" className="mt-4 inline-block text-accent underline">Back to the overview</Link>
    </div>
  );
}
