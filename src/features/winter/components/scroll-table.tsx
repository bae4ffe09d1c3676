import type { ReactNode } from "react";

/** A wide table that scrolls inside its card on a narrow screen; focusable so the keyboard can scroll it too. */
export function ScrollTable({ label, children }: { label: string; children: ReactNode }) {
  return (
    <div role="region" aria-label={`${label} (scrolls sideways on a narrow screen)`} tabIndex={0} className="overflow-x-auto rounded border border-line focus:outline-2 focus:outline-accent">
      <table aria-label={label} className="w-full text-left text-sm">{children}</table>
    </div>
  );
}

export const th = "whitespace-nowrap border-b border-line bg-paper px-2 py-1.5 font-semibold text-muted";
export const td = "border-b border-line/60 px-2 py-1.5 align-top";
export const num = `${td} text-right tabular-nums whitespace-nowrap`;
