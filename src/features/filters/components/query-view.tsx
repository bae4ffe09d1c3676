import type { ReactNode } from "react";
import type { UseQueryResult } from "@tanstack/react-query";
import { EmptyState, ErrorNotice, Skeleton } from "@/components/ui/states";
import { isPageStatus } from "@/lib/api-error";

/**
 * Renders a query's three states the same way on every analytics page: a skeleton while it loads, the error
 * in words with a retry, an empty state that says why, or the data. Signed out, no access and not found are
 * thrown to the route area's error boundary instead: a retry would not change them.
 */
export function QueryView<T>(props: {
  query: UseQueryResult<T>;
  label: string;
  isEmpty?: (data: T) => boolean;
  emptyTitle?: string;
  emptyText?: ReactNode;
  lines?: number;
  children: (data: T) => ReactNode;
}) {
  const q = props.query;
  if (q.isPending) return <Skeleton lines={props.lines ?? 5} label={`Loading ${props.label}`} />;
  if (q.isError && isPageStatus(q.error)) throw q.error;
  if (q.isError) return <ErrorNotice error={q.error} onRetry={() => q.refetch()} />;
  if (props.isEmpty?.(q.data)) return <EmptyState title={props.emptyTitle ?? `No ${props.label}`}>{props.emptyText}</EmptyState>;
  return <>{props.children(q.data)}</>;
}
