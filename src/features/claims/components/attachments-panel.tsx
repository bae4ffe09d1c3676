import { useRef, useState } from "react";
import { ErrorNotice } from "@/components/ui/states";
import { useClaimActions, useClaimStory } from "@/features/claims/api/claim-queries";
import { apiPaths } from "@shared/api-paths";
import type { ClaimDetail } from "@shared/schemas/claims";

/** Photos and documents kept with the claim; images show as thumbnails served through the claim's own authorised route. */
export function AttachmentsPanel({ claim }: { claim: ClaimDetail }) {
  const { upload } = useClaimActions(claim.id);
  const { removeAttachment } = useClaimStory(claim.id);
  const input = useRef<HTMLInputElement>(null);
  const [preview, setPreview] = useState<ClaimDetail["attachments"][number] | null>(null);
  // files can be taken out until the claim goes to the maker
  const removable = claim.status === "draft" && claim.storageAvailable;
  return (
    <div className="space-y-3">
      {claim.attachments.length === 0 ? (
        <p className="text-sm text-muted">No attachments yet. Add photos of the failed part, meter readings or documents.</p>
      ) : (
        <ul className="grid grid-cols-2 gap-3 sm:grid-cols-4" aria-label="Attachments">
          {claim.attachments.map((a) => (
            <li key={a.id} className="rounded border border-line p-2 text-xs">
              <button type="button" onClick={() => setPreview(a)} className="block w-full" aria-label={`Preview ${a.originalName}`}>
                {a.isImage ? (
                  <img src={apiPaths.claimAttachment(claim.id, a.id)} alt={a.originalName} className="h-24 w-full rounded bg-paper object-contain" loading="lazy" />
                ) : (
                  <div className="grid h-24 place-items-center rounded bg-paper font-semibold uppercase text-muted">{a.extension}</div>
                )}
              </button>
              <p className="mt-1 truncate font-medium" title={a.originalName}>{a.originalName}</p>
              <p className="text-muted">{(a.sizeBytes / 1024).toFixed(1)} KB · {a.uploadedBy}</p>
              {removable && (
                <button
                  type="button"
                  disabled={removeAttachment.isPending}
                  onClick={() => {
                    if (window.confirm(`Remove ${a.originalName} from the claim? It will not be in the packet.`)) removeAttachment.mutate(a.id);
                  }}
                  className="mt-1 rounded border border-alert/50 px-2 py-0.5 text-alert hover:bg-alert/10"
                  aria-label={`Remove ${a.originalName}`}
                >
                  Remove
                </button>
              )}
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
      {removeAttachment.isError && <ErrorNotice error={removeAttachment.error} />}
      {preview && (
        <div role="dialog" aria-modal="true" aria-label={`Preview of ${preview.originalName}`} className="fixed inset-0 z-50 grid place-items-center bg-ink/60 p-4" onClick={() => setPreview(null)}>
          <div className="max-h-full w-full max-w-3xl overflow-auto rounded-lg bg-card p-3 shadow-xl" onClick={(e) => e.stopPropagation()}>
            <div className="mb-2 flex items-center justify-between gap-2">
              <p className="truncate font-semibold">{preview.originalName}</p>
              <div className="flex gap-2 text-sm">
                <a href={apiPaths.claimAttachment(claim.id, preview.id)} target="_blank" rel="noreferrer" className="rounded border border-line px-2 py-1">Open full size</a>
                <button type="button" onClick={() => setPreview(null)} className="rounded bg-slate px-2 py-1 text-paper">Close</button>
              </div>
            </div>
            {preview.isImage ? (
              <img src={apiPaths.claimAttachment(claim.id, preview.id)} alt={preview.originalName} className="mx-auto max-h-[70vh] object-contain" />
            ) : (
              <iframe title={preview.originalName} src={apiPaths.claimAttachment(claim.id, preview.id)} className="h-[70vh] w-full rounded border border-line" />
            )}
          </div>
        </div>
      )}
    </div>
  );
}
