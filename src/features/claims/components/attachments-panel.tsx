import { useRef } from "react";
import { ErrorNotice } from "@/components/ui/states";
import { useClaimActions } from "@/features/claims/api/claim-queries";
import { apiPaths } from "@shared/api-paths";
import type { ClaimDetail } from "@shared/schemas/claims";

/** Photos and documents kept with the claim; images show as thumbnails served through the claim's own authorised route. */
export function AttachmentsPanel({ claim }: { claim: ClaimDetail }) {
  const { upload } = useClaimActions(claim.id);
  const input = useRef<HTMLInputElement>(null);
  return (
    <div className="space-y-3">
      {claim.attachments.length === 0 ? (
        <p className="text-sm text-muted">No attachments yet. Add photos of the failed part, meter readings or documents.</p>
      ) : (
        <ul className="grid grid-cols-2 gap-3 sm:grid-cols-4" aria-label="Attachments">
          {claim.attachments.map((a) => (
            <li key={a.id} className="rounded border border-line p-2 text-xs">
              <a href={apiPaths.claimAttachment(claim.id, a.id)} target="_blank" rel="noreferrer">
                {a.isImage ? (
                  <img src={apiPaths.claimAttachment(claim.id, a.id)} alt={a.originalName} className="h-24 w-full rounded bg-paper object-contain" loading="lazy" />
                ) : (
                  <div className="grid h-24 place-items-center rounded bg-paper font-semibold uppercase text-muted">{a.extension}</div>
                )}
              </a>
              <p className="mt-1 truncate font-medium" title={a.originalName}>{a.originalName}</p>
              <p className="text-muted">{(a.sizeBytes / 1024).toFixed(1)} KB · {a.uploadedBy}</p>
            </li>
          ))}
        </ul>
      )}
      {claim.storageAvailable ? (
        <label className="inline-flex cursor-pointer items-center gap-2 rounded border border-line bg-paper px-3 py-1.5 text-sm">
          <span>{upload.isPending ? "Uploading…" : "Attach a file"}</span>
          <input
            ref={input}
            type="file"
            accept="image/png,image/jpeg,image/webp,image/gif,application/pdf"
            className="sr-only"
            aria-label="Attach a file"
            onChange={(e) => {
              const f = e.target.files?.[0];
              if (f) upload.mutate(f, { onSettled: () => { if (input.current) input.current.value = ""; } });
            }}
          />
        </label>
      ) : (
        <p role="status" className="text-sm text-alert">
          Object storage is not available right now (or not set up on this server), so files cannot be attached and
          attached files may not open. Reload the claim in a minute to try again.
        </p>
      )}
      <p className="text-xs text-muted">Photos (PNG, JPEG, WebP, GIF) and PDF documents up to 8 MB; the type is checked by the file's content, not its name.</p>
      {upload.isError && <ErrorNotice error={upload.error} />}
    </div>
  );
}
