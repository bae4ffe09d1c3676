import { useState, type DragEvent } from "react";
import { ErrorNotice } from "@/components/ui/states";
import { useUploadImports } from "../api/import-queries";
import { IMPORT_EXTENSIONS, MAX_IMPORT_BYTES, screenFiles } from "../import-words";
import { useFormat } from "@/lib/use-format";

/**
 * Where exports come in: dropped on the zone or picked with the button (several at once). Files the server
 * would turn away for their name or size are named here, with why, and the rest go up in one request.
 */
export function ImportDropZone() {
  const fmt = useFormat();
  const upload = useUploadImports();
  const [over, setOver] = useState(false);
  const [turnedAway, setTurnedAway] = useState<{ name: string; why: string }[]>([]);

  const take = (files: readonly File[]) => {
    const screened = screenFiles(files, fmt);
    setTurnedAway(screened.turnedAway);
    if (screened.accepted.length > 0) upload.mutate(screened.accepted);
  };
  const onDrag = (e: DragEvent, entering: boolean) => {
    e.preventDefault();
    setOver(entering);
  };

  return (
    <section
      aria-label="Upload exports"
      onDragEnter={(e) => onDrag(e, true)}
      onDragOver={(e) => onDrag(e, true)}
      onDragLeave={(e) => onDrag(e, false)}
      onDrop={(e) => {
        onDrag(e, false);
        take(Array.from(e.dataTransfer.files));
      }}
      className={`rounded-lg border-2 border-dashed p-5 text-center transition-colors sm:p-8 ${over ? "border-accent bg-accent-soft/60" : "border-line bg-card"}`}
    >
      <p className="font-semibold">Drop export files here</p>
      <p className="my-2 text-sm text-muted">or</p>
      <label className="inline-block cursor-pointer rounded bg-accent px-4 py-2 text-sm font-semibold text-white focus-within:outline focus-within:outline-2 focus-within:outline-offset-2 focus-within:outline-accent">
        Choose files
        <input
          type="file"
          multiple
          accept={[...IMPORT_EXTENSIONS, "text/csv", "text/plain"].join(",")}
          className="sr-only"
          onChange={(e) => {
            take(Array.from(e.target.files ?? []));
            e.target.value = "";
          }}
        />
      </label>
      <p className="mt-3 text-xs text-muted">
        CSV or text exports ({IMPORT_EXTENSIONS.join(", ")}), up to {fmt.fileSize(MAX_IMPORT_BYTES)} each. Every row is checked before anything is
        stored; nothing changes in the warehouse until you press Load.
      </p>
      {upload.isPending && <p role="status" className="mt-2 text-sm">Sending {upload.variables.length === 1 ? upload.variables[0].name : `${upload.variables.length} files`}…</p>}
      {turnedAway.length > 0 && (
        <div role="alert" className="mx-auto mt-3 max-w-xl rounded border border-alert/40 bg-alert/5 p-3 text-left text-sm">
          <p className="font-semibold text-alert">{turnedAway.length === 1 ? "This file was not sent:" : "These files were not sent:"}</p>
          <ul className="ml-5 list-disc">
            {turnedAway.map((t) => <li key={t.name}><span className="font-mono">{t.name}</span>: {t.why}</li>)}
          </ul>
        </div>
      )}
      {upload.isError && <div className="mx-auto mt-3 max-w-xl text-left"><ErrorNotice error={upload.error} /></div>}
    </section>
  );
}
