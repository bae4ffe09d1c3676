/** The data the claim packet is rendered from. */
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
  generatedAt: string;
}
