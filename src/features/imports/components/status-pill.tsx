import { importStatusLabels, type Batch, type ImportStatus } from "@shared/schemas/imports";

const importTones: Record<ImportStatus, string> = {
  checking: "border-accent/40 bg-accent-soft text-accent",
  ready: "border-accent bg-accent text-white",
  refused: "border-alert/50 bg-alert/10 text-alert",
  queued: "border-ochre/60 bg-ochre/15 text-ink",
  loading: "border-ochre bg-ochre/30 text-ink",
  loaded: "border-ok/50 bg-ok/10 text-ok",
  failed: "border-alert/50 bg-alert/10 text-alert",
  cancelled: "border-line bg-paper text-muted",
};

export function ImportStatusPill({ status }: { status: ImportStatus }) {
  return <span className={`inline-block whitespace-nowrap rounded-full border px-2 py-0.5 text-xs font-semibold ${importTones[status]}`}>{importStatusLabels[status]}</span>;
}

export const batchStatusLabels: Record<Batch["status"], string> = {
  running: "Loading",
  loaded: "Loaded",
  already_loaded: "Loaded before",
  failed: "Failed",
};

const batchTones: Record<Batch["status"], string> = {
  running: "text-ink",
  loaded: "text-ok",
  already_loaded: "text-muted",
  failed: "text-alert",
};

export function BatchStatus({ status }: { status: Batch["status"] }) {
  return <span className={`whitespace-nowrap text-xs font-semibold ${batchTones[status]}`}>{batchStatusLabels[status]}</span>;
}
