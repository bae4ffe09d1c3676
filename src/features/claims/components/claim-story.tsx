import { useEffect, useState } from "react";
import { useQuery } from "@tanstack/react-query";
import { useForm } from "react-hook-form";
import { zodResolver } from "@hookform/resolvers/zod";
import { ErrorNotice, Skeleton } from "@/components/ui/states";
import { claimStoryQuery, useClaimStory } from "@/features/claims/api/claim-queries";
import { narrativeSchema, type ClaimStory, type Narrative } from "@shared/schemas/claim-story";
import { useFormat } from "@/lib/use-format";

const PARTS: { key: keyof Narrative; label: string; hint: string }[] = [
  { key: "found", label: "What was found", hint: "The complaint, the machine and its hours, what the readings showed." },
  { key: "done", label: "What was done", hint: "The correction: parts replaced, tests after the repair." },
  { key: "why", label: "Why it is the maker's", hint: "Why the failure is the part's, not use or servicing, and that it is within cover." },
];

/** The narrative the maker reads first in the packet; a first draft comes from the repair orders. */
export function NarrativeCard({ claimId }: { claimId: string }) {
  const q = useQuery(claimStoryQuery(claimId));
  if (q.isPending) return <Skeleton lines={4} label="Loading the narrative" />;
  if (q.isError) return <ErrorNotice error={q.error} onRetry={() => q.refetch()} />;
  return <NarrativeForm claimId={claimId} story={q.data} />;
}

function NarrativeForm({ claimId, story }: { claimId: string; story: ClaimStory }) {
  const { saveNarrative } = useClaimStory(claimId);
  const form = useForm<Narrative>({ resolver: zodResolver(narrativeSchema), defaultValues: story.narrative, mode: "onTouched" });
  const { errors, isDirty } = form.formState;
  useEffect(() => form.reset(story.narrative), [story.narrative, form]);
  const empty = PARTS.every((p) => !story.narrative[p.key].trim());
  if (!story.editable) {
    return empty ? (
      <p className="text-sm text-muted">The claim went to the maker without a narrative.</p>
    ) : (
      <dl className="space-y-2 text-sm">
        {PARTS.map((p) => story.narrative[p.key].trim() && (
          <div key={p.key}><dt className="font-semibold">{p.label}</dt><dd className="whitespace-pre-wrap">{story.narrative[p.key]}</dd></div>
        ))}
      </dl>
    );
  }
  return (
    <form className="space-y-3" aria-label="Narrative" onSubmit={form.handleSubmit((n) => saveNarrative.mutate(n))}>
      <p className="text-sm text-muted">The story the maker reads first in the packet. Start from what the repair orders say, then put it in your own words.</p>
      <button
        type="button"
        className="rounded border border-line bg-paper px-3 py-1 text-sm"
        onClick={() => {
          for (const p of PARTS) form.setValue(p.key, story.suggestion[p.key], { shouldDirty: true });
        }}
      >
        {empty ? "Start from the repair orders" : "Replace with a draft from the repair orders"}
      </button>
      {PARTS.map((p) => (
        <label key={p.key} className="block text-sm">
          <span className="font-semibold">{p.label}</span>
          <span className="block text-xs text-muted">{p.hint}</span>
          <textarea {...form.register(p.key)} rows={3} aria-invalid={Boolean(errors[p.key])} className="mt-1 block w-full rounded border border-line bg-white p-2 text-sm" />
          {errors[p.key] && <span role="alert" className="text-xs text-alert">{errors[p.key]!.message}</span>}
        </label>
      ))}
      <div className="flex items-center gap-3">
        <button type="submit" disabled={saveNarrative.isPending || !isDirty} className="rounded bg-slate px-3 py-1.5 text-sm text-paper disabled:opacity-50">
          {saveNarrative.isPending ? "Saving…" : "Save the narrative"}
        </button>
        {saveNarrative.isSuccess && !isDirty && <span role="status" className="text-sm text-ok">Saved; the packet carries it.</span>}
      </div>
      {saveNarrative.isError && <ErrorNotice error={saveNarrative.error} />}
    </form>
  );
}

/** Notes between the warranty clerk and the shop: kept with the claim, never in the packet. */
export function NotesPanel({ claimId }: { claimId: string }) {
  const fmt = useFormat();
  const q = useQuery(claimStoryQuery(claimId));
  const { addNote } = useClaimStory(claimId);
  const [text, setText] = useState("");
  const [problem, setProblem] = useState<string | null>(null);
  if (q.isPending) return <Skeleton lines={3} label="Loading the notes" />;
  if (q.isError) return <ErrorNotice error={q.error} onRetry={() => q.refetch()} />;
  return (
    <div className="space-y-3">
      {q.data.notes.length === 0 ? (
        <p className="text-sm text-muted">No notes yet. Ask the shop for a missing photo or reading here; notes stay with the claim and are not sent to the maker.</p>
      ) : (
        <ol className="space-y-2" aria-label="Notes">
          {q.data.notes.map((n) => (
            <li key={n.id} className="rounded border border-line/70 bg-paper/60 p-2 text-sm">
              <p className="text-xs text-muted">{n.authorName} ({n.authorRole === "shop" ? "the shop" : n.authorRole}), {fmt.dateTime(n.at)}</p>
              <p className="whitespace-pre-wrap">{n.text}</p>
            </li>
          ))}
        </ol>
      )}
      <form
        className="space-y-2"
        aria-label="Add a note"
        onSubmit={(e) => {
          e.preventDefault();
          const t = text.trim();
          if (!t) return setProblem("Write the note first.");
          if (t.length > 2000) return setProblem("A note is at most 2,000 characters.");
          setProblem(null);
          addNote.mutate(t, { onSuccess: () => setText("") });
        }}
      >
        <label className="block text-sm">
          <span className="font-semibold">Note to the shop or the clerk</span>
          <textarea value={text} onChange={(e) => setText(e.target.value)} rows={2} aria-invalid={Boolean(problem)} className="mt-1 block w-full rounded border border-line bg-white p-2 text-sm" />
        </label>
        {problem && <p role="alert" className="text-xs text-alert">{problem}</p>}
        <button type="submit" disabled={addNote.isPending} className="rounded bg-slate px-3 py-1 text-sm text-paper disabled:opacity-50">{addNote.isPending ? "Adding…" : "Add the note"}</button>
        {addNote.isError && <ErrorNotice error={addNote.error} />}
      </form>
    </div>
  );
}
