import type { Db } from "../../db/database.js";
import type { ShopScope } from "../../../shared/schemas/me.js";
import type { ClaimStory, Narrative } from "../../../shared/schemas/claim-story.js";
import type { ClusterSnapshot } from "../../../shared/schemas/claims.js";
import { HttpError, notFound } from "../../errors.js";
import { claimLineKeys, type Actor, type ClaimRow } from "../../db/queries/claims.js";
import { addNote, claimNarrative, claimNotes, removeAttachmentRecord, saveNarrative } from "../../db/queries/claim-story.js";
import { claimInScope, evidenceFor } from "./claims-service.js";
import { narrativeDraft } from "./narrative-draft.js";
import type { Storage } from "../storage.js";
import { todayIso } from "../../../shared/dates.js";

/** The narrative and the photos can change until the claim goes to the maker: while it is a draft. */
const editable = (c: ClaimRow) => c.status === "draft";

function refuseUnlessEditable(c: ClaimRow, what: string): void {
  if (!editable(c)) throw new HttpError(409, "claim_not_draft", `Claim ${c.claim_number} has gone to the maker (${c.status.replace("_", " ")}), so ${what} can no longer change; add a note instead, or correct it as the claim's next version if the maker rejects it.`);
}

export async function claimStory(db: Db, scope: ShopScope, id: string): Promise<ClaimStory> {
  const c = await claimInScope(db, scope, id);
  const n = await claimNarrative(db, id);
  const lines = await evidenceFor(db, { kind: "all" }, await claimLineKeys(db, id), todayIso());
  const notes = await claimNotes(db, id);
  return {
    narrative: { found: n.narrative_found ?? "", done: n.narrative_done ?? "", why: n.narrative_why ?? "" },
    suggestion: narrativeDraft({ kind: c.kind, lines, cluster: (c.cluster_snapshot as ClusterSnapshot | null) ?? null }),
    editable: editable(c),
    notes: notes.map((x) => ({ id: String(x.note_id), at: x.at.toISOString(), authorName: x.author_name, authorRole: x.author_role, text: x.body })),
  };
}

export async function updateNarrative(db: Db, scope: ShopScope, id: string, n: Narrative, actor: Actor): Promise<void> {
  const c = await claimInScope(db, scope, id);
  refuseUnlessEditable(c, "its narrative");
  await saveNarrative(db, id, n, actor);
}

export async function postNote(db: Db, scope: ShopScope, id: string, text: string, actor: Actor & { role: string }): Promise<void> {
  await claimInScope(db, scope, id);
  await addNote(db, id, text, actor);
}

/** Removes an attachment before the claim is sent: its record (audited) and then its object in storage. */
export async function removeAttachment(deps: { db: Db; storage?: Storage }, scope: ShopScope, id: string, attachmentId: string, actor: Actor): Promise<void> {
  const c = await claimInScope(deps.db, scope, id);
  refuseUnlessEditable(c, "its attachments");
  if (!deps.storage) throw new HttpError(503, "storage_unavailable", "Object storage is not configured on this server, so attachments cannot be removed.");
  const gone = await removeAttachmentRecord(deps.db, id, attachmentId, actor);
  if (!gone) throw notFound(`Attachment ${attachmentId} of claim ${c.claim_number}`);
  // the record is gone first: an object left behind by a store that fails now is unreachable, never shown or sent
  await deps.storage.deleteObject(gone.key).catch(() => undefined);
}
