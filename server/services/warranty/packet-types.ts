/** The data the claim packet is rendered from. */
import type { ClaimLineSplit } from "../../../shared/schemas/claim-lifecycle.js";
import type { ClaimKind, ClaimStatus, ClusterSnapshot, RepairLineEvidence } from "../../../shared/schemas/claims.js";

export interface PacketAttachment {
  originalName: string;
  contentType: string;
  sizeBytes: number;
  uploadedAt: string;
  uploadedBy: string;
  /** the file's bytes; images are embedded, other files only listed */
  data: Buffer | null;
}

/** Everything the packet shows, gathered before rendering so the renderer does no I/O. */
export interface ClaimSnapshotForPacket {
  claimNumber: string;
  kind: ClaimKind;
  status: ClaimStatus;
  title: string;
  shopCode: string | null;
  engineFamily: string;
  deadlineText: string;
  amountClaimed: number | null;
  warrantyEmail: string;
  createdBy: string;
  createdAt: string;
  reason: string | null;
  note: string | null;
  lines: RepairLineEvidence[];
  eligibilityCounts: { covered: number; notCovered: number; unknown: number };
  cluster: ClusterSnapshot | null;
  attachments: PacketAttachment[];
  /** the unit temperatures are stated in (the claim's) */
  temperatureUnit: "C" | "F";
  cautions: readonly string[];
  /** the lines in the amount claimed (covered, or included deliberately with a reason) and those listed apart */
  split?: ClaimLineSplit;
  /** the version of the claim, and what was corrected in it after a rejection */
  revision?: number;
  correction?: string | null;
  /** "judged under policy version N of <family>" (the warranty policy version the claim was judged under) */
  policyText?: string;
  /** the claim's narrative (empty strings where not written) */
  narrative: { found: string; done: string; why: string };
  generatedAt: string;
}
