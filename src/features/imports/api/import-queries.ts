import { queryOptions, useMutation, useQueryClient, type QueryClient } from "@tanstack/react-query";
import { apiGet, apiSend } from "@/lib/api-client";
import { apiPaths } from "@shared/api-paths";
import { importListSchema, importProfileListSchema, importSchema, uploadResultSchema, type Import, type ImportChoices } from "@shared/schemas/imports";
import { isActive } from "../import-words";
import { batchQueries } from "./batch-queries";

export const importQueries = {
  all: () => ["imports"] as const,
  /** the profiles a file can be read with (latest versions), for a check's choices */
  profiles: () =>
    queryOptions({
      queryKey: [...importQueries.all(), "profiles"] as const,
      queryFn: ({ signal }) => apiGet(apiPaths.importProfiles(), importProfileListSchema, signal),
      staleTime: 60_000,
    }),
  /**
   * The recent uploads, newest first: what the page shows again after a reload, mid-load or not. Each one also
   * seeds its detail, which is what a card reads (and, while the server works on it, polls).
   */
  list: () =>
    queryOptions({
      queryKey: [...importQueries.all(), "list"] as const,
      queryFn: async ({ signal, client }) => {
        const list = await apiGet(apiPaths.imports(), importListSchema, signal);
        for (const imp of list.imports) client.setQueryData(importQueries.detail(imp.id).queryKey, imp);
        return list;
      },
    }),
  /**
   * One upload, asked for again every second while the server is checking, queueing or loading it. The list
   * is kept in step; when a load ends (loaded, failed or cancelled), the batch history is fetched again (a new batch is in it).
   */
  detail: (id: string) =>
    queryOptions({
      queryKey: [...importQueries.all(), "detail", id] as const,
      queryFn: async ({ signal, client, queryKey }): Promise<Import> => {
        const before = client.getQueryData<Import>(queryKey);
        const imp = await apiGet(apiPaths.importItem(id), importSchema, signal);
        replaceInList(client, imp);
        if (before && (before.status === "queued" || before.status === "loading") && !isActive(imp.status)) void client.invalidateQueries({ queryKey: batchQueries.all() });
        return imp;
      },
      refetchInterval: (q) => (isActive(q.state.data?.status) ? 1000 : false),
    }),
};

function replaceInList(qc: QueryClient, imp: Import): void {
  qc.setQueryData(importQueries.list().queryKey, (old) => {
    if (!old) return old;
    const at = old.imports.findIndex((i) => i.id === imp.id);
    if (at < 0) return { imports: [imp, ...old.imports] };
    const imports = old.imports.slice();
    imports[at] = imp;
    return { imports };
  });
}

/** Puts an import as the server now has it into the detail and list caches (a new one first in the list). */
export function storeImport(qc: QueryClient, imp: Import): void {
  qc.setQueryData(importQueries.detail(imp.id).queryKey, imp);
  replaceInList(qc, imp);
}

/** POST /api/imports: one multipart request, every file in the field "files"; each comes back being checked. */
export function useUploadImports() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (files: readonly File[]) => {
      const form = new FormData();
      for (const f of files) form.append("files", f, f.name);
      return apiSend("POST", apiPaths.imports(), form, uploadResultSchema);
    },
    onSuccess: ({ imports }) => {
      for (const imp of [...imports].reverse()) storeImport(qc, imp);
    },
  });
}

/** Check again, load, cancel: each answers the import as it now stands. */
export function useImportActions(id: string) {
  const qc = useQueryClient();
  const onSuccess = (imp: Import) => storeImport(qc, imp);
  return {
    check: useMutation({ mutationFn: (choices: ImportChoices) => apiSend("POST", apiPaths.importCheck(id), choices, importSchema), onSuccess }),
    load: useMutation({ mutationFn: () => apiSend("POST", apiPaths.importLoad(id), {}, importSchema), onSuccess }),
    cancel: useMutation({ mutationFn: () => apiSend("POST", apiPaths.importCancel(id), {}, importSchema), onSuccess }),
  };
}
