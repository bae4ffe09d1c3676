/** The page of one batch's rejects (the router mounts it at /imports/batches/:id). */
export const batchPath = (id: string) => `/imports/batches/${encodeURIComponent(id)}`;
