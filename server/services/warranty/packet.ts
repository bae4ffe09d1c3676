/** The claim packet rendered as a PDF (pdfkit) from a snapshot gathered beforehand; no I/O here. */
import { hourBandLabel, temperatureBandLabel } from "../../../shared/bands.js";
import type { ClaimSnapshotForPacket, PacketAttachment } from "./packet-types.js";
import type { RepairLineEvidence } from "../../../shared/schemas/claims.js";
import { claimStatusLabels } from "../../../shared/schemas/claims.js";
import { ACCENT, ALERT, INK, LINE, MUTED, finishPdf, openPdf, pdfText } from "../pdf-style.js";

const MARGIN = 48;

const fmt = (n: number | null | undefined, digits = 1) =>
  n === null || n === undefined ? "–" : n.toLocaleString("en-US", { maximumFractionDigits: digits, minimumFractionDigits: 0 });
const money = (n: number | null | undefined) =>
  n === null || n === undefined ? "–" : n.toLocaleString("en-US", { minimumFractionDigits: 2, maximumFractionDigits: 2 });
const or = (s: string | null | undefined) => (s && s.trim() ? s : "–");

type Doc = PDFKit.PDFDocument;
interface Col {
  label: string;
  width: number;
  align?: "left" | "right";
}

function pageWidth(doc: Doc) {
  return doc.page.width - 2 * MARGIN;
}

function ensureSpace(doc: Doc, h: number) {
  if (doc.y + h > doc.page.height - MARGIN - 24) doc.addPage();
}

function heading(doc: Doc, text: string) {
  ensureSpace(doc, 60);
  doc.moveDown(0.8);
  doc.font("bold").fontSize(12).fillColor(ACCENT).text(pdfText(text), MARGIN, doc.y);
  const y = doc.y + 2;
  doc.moveTo(MARGIN, y).lineTo(MARGIN + pageWidth(doc), y).lineWidth(0.5).strokeColor(LINE).stroke();
  doc.moveDown(0.4);
  doc.font("regular").fontSize(9).fillColor(INK);
}

/** Label–value pairs in two columns. */
function facts(doc: Doc, pairs: [string, string][]) {
  const w = pageWidth(doc);
  const half = w / 2;
  for (let i = 0; i < pairs.length; i += 2) {
    ensureSpace(doc, 28);
    const y = doc.y;
    let bottom = y;
    pairs.slice(i, i + 2).forEach(([label, value], j) => {
      const x = MARGIN + j * half;
      doc.font("regular").fontSize(7.5).fillColor(MUTED).text(pdfText(label.toUpperCase()), x, y, { width: half - 12 });
      doc.font("regular").fontSize(9.5).fillColor(INK).text(pdfText(value), x, doc.y + 1, { width: half - 12 });
      bottom = Math.max(bottom, doc.y);
    });
    doc.y = bottom + 5;
  }
  doc.x = MARGIN;
}

function paragraph(doc: Doc, label: string, text: string) {
  ensureSpace(doc, 30);
  doc.font("bold").fontSize(8.5).fillColor(MUTED).text(pdfText(label), MARGIN, doc.y);
  doc.font("regular").fontSize(9.5).fillColor(INK).text(pdfText(text), MARGIN, doc.y + 1, { width: pageWidth(doc) });
  doc.moveDown(0.4);
}

// Drawn by hand: pdfkit has no tables, and a few fixed-column tables do not justify a table plug-in.
function table(doc: Doc, cols: Col[], rows: string[][], opts: { highlight?: (i: number) => boolean } = {}) {
  const total = cols.reduce((s, c) => s + c.width, 0);
  const scale = pageWidth(doc) / total;
  const widths = cols.map((c) => c.width * scale);
  const drawHeader = () => {
    const y = doc.y;
    doc.font("bold").fontSize(7.5).fillColor(MUTED);
    const h = Math.max(...cols.map((c, i) => doc.heightOfString(pdfText(c.label), { width: widths[i] - 4 })));
    let x = MARGIN;
    cols.forEach((c, i) => {
      doc.text(pdfText(c.label), x + 2, y, { width: widths[i] - 4, align: c.align ?? "left" });
      x += widths[i];
    });
    doc.y = y + h + 2;
    doc.moveTo(MARGIN, doc.y).lineTo(MARGIN + pageWidth(doc), doc.y).lineWidth(0.5).strokeColor(LINE).stroke();
    doc.y += 3;
  };
  ensureSpace(doc, 40);
  drawHeader();
  rows.forEach((row, r) => {
    doc.font("regular").fontSize(8.5);
    const h = Math.max(...row.map((cell, i) => doc.heightOfString(pdfText(cell), { width: widths[i] - 4 }))) + 3;
    if (doc.y + h > doc.page.height - MARGIN - 24) {
      doc.addPage();
      drawHeader();
      doc.font("regular").fontSize(8.5);
    }
    const y = doc.y;
    let x = MARGIN;
    doc.fillColor(opts.highlight?.(r) ? ALERT : INK);
    row.forEach((cell, i) => {
      doc.text(pdfText(cell), x + 2, y, { width: widths[i] - 4, align: cols[i].align ?? "left" });
      x += widths[i];
    });
    doc.y = y + h;
  });
  doc.fillColor(INK);
  doc.x = MARGIN;
  doc.moveDown(0.3);
}

function machineSection(doc: Doc, l: RepairLineEvidence) {
  heading(doc, "Machine");
  facts(doc, [
    ["Serial", l.machine.serial],
    ["Model line", `${l.machine.modelLine} (model code ${l.machine.modelCode})`],
    ["Engine family", l.machine.engineFamily],
    ["Engine serial", or(l.machine.engineSerial)],
    ["Build date", or(l.machine.buildDate)],
    ["Delivery date", or(l.machine.deliveryDate)],
    ["Hour meter at failure", l.hourMeter === null ? "not recorded" : `${fmt(l.hourMeter)} h`],
    ["Heater-plug lot fitted at build", or(l.machine.heaterPlugLot)],
  ]);
  if (l.hourTrail?.length) {
    doc.font("bold").fontSize(9).fillColor(INK).text("Hour-meter readings around the failure", MARGIN, doc.y);
    doc.font("regular");
    table(
      doc,
      [
        { label: "Date", width: 110 },
        { label: "Hours", width: 60, align: "right" },
        { label: "Source", width: 80 },
        { label: "Meter", width: 45, align: "right" },
        { label: "Kept by the hour-meter cleaning", width: 200 },
      ],
      l.hourTrail.map((r) => [
        r.date + (r.thisRepair ? " (this RO)" : ""),
        fmt(r.hours),
        r.source,
        String(r.meterGeneration),
        r.valid ? "yes" : `no: ${or(r.invalidReason)}`,
      ]),
      { highlight: (i) => !l.hourTrail![i].valid },
    );
  }
}

function repairSection(doc: Doc, l: RepairLineEvidence) {
  heading(doc, `Repair order ${l.roNumber}, line ${l.lineNo}`);
  facts(doc, [
    ["Shop", l.shopCode],
    ["Component", `${l.component.name} (${l.component.system} › ${l.component.assembly})`],
    ["Opened", l.openedDate],
    ["Closed", or(l.closedDate)],
    ["Pay type on the RO", l.payType],
    ["Fault codes (SAE J1939 SPN / FMI)", l.faultCodes.length ? l.faultCodes.map((f) => `SPN ${f.spn} FMI ${f.fmi}${f.meaning ? ` (${f.meaning})` : ""}`).join("; ") : "none logged"],
  ]);
  paragraph(doc, "Complaint", or(l.complaint));
  paragraph(doc, "Cause", or(l.cause));
  paragraph(doc, "Correction", or(l.correction));
  heading(doc, "Parts and labour");
  table(
    doc,
    [
      { label: "Part number", width: 90 },
      { label: "Description", width: 150 },
      { label: "Qty", width: 40, align: "right" },
      { label: "Supplier lot", width: 80 },
      { label: "Parts cost", width: 70, align: "right" },
    ],
    [[or(l.partNumber), or(l.partDescription), fmt(l.partQty, 2), or(l.supplierLot), money(l.partsCost)]],
  );
  table(
    doc,
    [
      { label: "Labour operation", width: 110 },
      { label: "Standard time (h)", width: 90, align: "right" },
      { label: "Actual time (h)", width: 90, align: "right" },
      { label: "Labour cost", width: 80, align: "right" },
      { label: "Parts + labour", width: 80, align: "right" },
    ],
    [[or(l.laborOp), fmt(l.standardHours, 2), fmt(l.laborHours, 2), money(l.laborCost), money((l.partsCost ?? 0) + (l.laborCost ?? 0))]],
  );
}

function eligibilitySection(doc: Doc, l: RepairLineEvidence) {
  heading(doc, "Warranty eligibility");
  const e = l.eligibility;
  doc.font("bold").fontSize(10).fillColor(e.verdict === "covered" ? INK : ALERT).text(pdfText(e.summary), MARGIN, doc.y, { width: pageWidth(doc) });
  doc.font("regular").fontSize(9).fillColor(INK);
  doc.text(pdfText(`Months: ${e.monthsCheck.text}`), { width: pageWidth(doc) });
  doc.text(pdfText(`Hours: ${e.hoursCheck.text}`), { width: pageWidth(doc) });
  doc.fillColor(MUTED).fontSize(8).text(pdfText(e.termsSource), { width: pageWidth(doc) });
  if (l.hoursAtRisk) doc.fillColor(ALERT).fontSize(9).text(pdfText(`At risk: ${l.hoursAtRisk}`), { width: pageWidth(doc) });
  if (l.deadline) doc.fillColor(INK).fontSize(9).text(pdfText(`Filing: ${l.deadline.text}`));
  doc.fillColor(INK);
}

/** A bold line that titles the table below it. */
function subheading(doc: Doc, text: string) {
  doc.font("bold").fontSize(9).text(text, MARGIN, doc.y);
  doc.font("regular");
}

function measurementSection(doc: Doc, l: RepairLineEvidence) {
  const m = l.interpretation;
  if (!m.compression && m.plugs.length === 0 && m.rail.length === 0 && m.battery.length === 0) return;
  heading(doc, "Measurements and their interpretation");
  const c = m.compression;
  if (c) {
    subheading(doc, "Compression per cylinder (psi, mean of the attempts)");
    table(
      doc,
      [
        { label: "Cylinder", width: 50 },
        { label: "Attempts (psi)", width: 120 },
        { label: "Mean (psi)", width: 60, align: "right" },
        { label: "Band", width: 170 },
        { label: "Threshold from", width: 110 },
      ],
      c.cylinders.map((y) => [String(y.position), y.attempts.map((a) => fmt(a, 0)).join(" / "), fmt(y.mean, 0), y.band, y.source]),
      { highlight: (i) => c.cylinders[i].verdict === "fault" },
    );
    facts(doc, [
      ["Average", `${fmt(c.average, 0)} psi`],
      ["Lowest cylinder (the engine is rated by it)", `cylinder ${c.lowest.position}: ${fmt(c.lowest.mean, 0)} psi – ${c.lowest.band} (threshold from ${c.lowest.source})`],
      ["Spread (max − min) ÷ max", `(${fmt(c.highest.mean, 0)} − ${fmt(c.lowest.mean, 0)}) ÷ ${fmt(c.highest.mean, 0)} = ${fmt(c.spread * 100, 1)} % – ${c.spreadBand} (threshold from ${c.spreadSource})`],
      ["Pattern", `${c.pattern.meaning} (reading from ${c.pattern.source})`],
    ]);
  }
  if (m.plugs.length) {
    subheading(doc, "Heater-plug resistance (cold, disconnected)");
    table(
      doc,
      [
        { label: "Plug", width: 45 },
        { label: "As recorded", width: 80 },
        { label: "Ohm", width: 60, align: "right" },
        { label: "Verdict", width: 200 },
        { label: "Threshold from", width: 125 },
      ],
      m.plugs.map((p) => [String(p.position), p.raw, p.ohms === null ? "–" : fmt(p.ohms, 2), p.label, p.source]),
      { highlight: (i) => m.plugs[i].verdict !== "healthy" },
    );
  }
  if (m.rail.length) {
    subheading(doc, "Preheat rail voltage (key on, while energised)");
    table(
      doc,
      [{ label: "As recorded", width: 90 }, { label: "Volts", width: 60, align: "right" }, { label: "Verdict", width: 230 }, { label: "Threshold from", width: 125 }],
      m.rail.map((r) => [r.raw, fmt(r.volts, 2), r.label, r.source]),
    );
  }
  if (m.battery.length) {
    subheading(doc, "Battery voltage");
    table(doc, [{ label: "As recorded", width: 100 }, { label: "Volts", width: 70, align: "right" }], m.battery.map((r) => [r.raw, fmt(r.volts, 2)]));
  }
}

function clusterSection(doc: Doc, s: ClaimSnapshotForPacket) {
  const snap = s.cluster;
  if (!snap) return;
  const c = snap.cluster;
  heading(doc, "Cluster statistics (cohort evidence)");
  paragraph(doc, "Finding", c.description);
  facts(doc, [
    ["Observed failures", fmt(c.observed, 0)],
    ["Expected failures", fmt(c.expected, 1)],
    ["Observed ÷ expected", `${fmt(c.ratio, 2)} (95 % limits ${fmt(c.lower, 2)}–${fmt(c.upper, 2)})`],
    ["p-value (one-sided exact Poisson) / q-value (BH)", `${c.pValue.toExponential(2)} / ${c.qValue.toExponential(2)}`],
    ["Engine family", c.dimensions.engineFamily],
    ["Build window", c.dimensions.build === "all" ? "all builds" : `${c.dimensions.build.from} to ${c.dimensions.build.to}`],
    ["Supplier lot", c.dimensions.supplierLot],
    ["Shop / temperature band / hour band", `${c.dimensions.shop} / ${c.dimensions.temperatureBand === "all" ? "all" : temperatureBandLabel(c.dimensions.temperatureBand, s.temperatureUnit)} / ${c.dimensions.hourBand === "all" ? "all" : hourBandLabel(c.dimensions.hourBand)}`],
  ]);
  paragraph(doc, "Method", snap.method);
  paragraph(doc, "Caution", snap.caution);
  doc.font("regular").fontSize(8).fillColor(MUTED).text(`Statistics as taken on ${snap.takenAt.slice(0, 10)} (cluster ${c.id}).`);
  doc.fillColor(INK);
  const counts = s.eligibilityCounts;
  heading(doc, `Repair lines in the case (${s.lines.length})`);
  doc.fontSize(9).text(`Eligibility: ${counts.covered} covered, ${counts.notCovered} not covered, ${counts.unknown} cannot be decided.`);
  doc.moveDown(0.3);
  table(
    doc,
    [
      { label: "RO / line", width: 62 },
      { label: "Shop", width: 30 },
      { label: "Serial", width: 78 },
      { label: "Model", width: 36 },
      { label: "Opened", width: 56 },
      { label: "Hours", width: 42, align: "right" },
      { label: "Lot", width: 50 },
      { label: "Eligibility", width: 62 },
      { label: "Parts + labour", width: 56, align: "right" },
    ],
    s.lines.map((l) => [
      `${l.roNumber}/${l.lineNo}`,
      l.shopCode,
      l.machine.serial,
      l.machine.modelLine,
      l.openedDate,
      fmt(l.hourMeter, 0),
      or(l.machine.heaterPlugLot),
      l.eligibility.verdict === "covered" ? "covered" : l.eligibility.verdict === "not_covered" ? `no (${l.eligibility.endedBy})` : "unknown",
      money((l.partsCost ?? 0) + (l.laborCost ?? 0)),
    ]),
    { highlight: (i) => s.lines[i].eligibility.verdict !== "covered" },
  );
  const withReadings = s.lines.filter((l) => l.interpretation.compression || l.interpretation.plugs.length);
  if (withReadings.length) {
    heading(doc, "Readings on the case's repair lines");
    table(
      doc,
      [
        { label: "RO / line", width: 62 },
        { label: "Serial", width: 80 },
        { label: "Compression average / lowest (psi)", width: 110 },
        { label: "Spread", width: 50, align: "right" },
        { label: "Heater plugs", width: 170 },
      ],
      withReadings.map((l) => {
        const c2 = l.interpretation.compression;
        const plugs = l.interpretation.plugs;
        const bad = plugs.filter((p) => p.verdict !== "healthy");
        return [
          `${l.roNumber}/${l.lineNo}`,
          l.machine.serial,
          c2 ? `${fmt(c2.average, 0)} / ${fmt(c2.lowest.mean, 0)} (cyl. ${c2.lowest.position})` : "–",
          c2 ? `${fmt(c2.spread * 100, 1)} %` : "–",
          plugs.length ? (bad.length ? bad.map((p) => `plug ${p.position}: ${p.label}`).join("; ") : `${plugs.length} healthy`) : "–",
        ];
      }),
    );
    const sources = [
      ...new Set(withReadings.flatMap((l) => [...(l.interpretation.compression ? [l.interpretation.compression.lowest.source, l.interpretation.compression.spreadSource] : []), ...l.interpretation.plugs.map((p) => p.source)])),
    ];
    doc.font("regular").fontSize(8).fillColor(MUTED).text(pdfText(`Thresholds from ${sources.join("; ")}.`), MARGIN, doc.y, { width: pageWidth(doc) });
    doc.fillColor(INK);
  }
}

/** Lines claimed although not covered (each with the clerk's reason), and the lines the claim leaves apart. */
function inclusionSection(doc: Doc, s: ClaimSnapshotForPacket) {
  const split = s.split;
  if (!split) return;
  const byId = new Map(s.lines.map((l) => [l.id, l]));
  const ro = (id: string) => {
    const l = byId.get(id);
    return l ? `${l.roNumber}/${l.lineNo} (${l.machine.serial})` : id;
  };
  const deliberate = split.included.filter((x) => x.basis === "included");
  if (deliberate.length) {
    heading(doc, `Claimed although not covered (${deliberate.length})`);
    table(
      doc,
      [{ label: "RO / line", width: 110 }, { label: "Why not covered", width: 170 }, { label: "Reason for claiming it", width: 160 }, { label: "Parts + labour", width: 70, align: "right" }],
      deliberate.map((x) => [ro(x.lineId), x.why ?? "", `${x.reason ?? ""} (${x.includedBy ?? ""})`, money(x.amount)]),
    );
  }
  if (split.apart.length) {
    heading(doc, `Not claimed: listed apart (${split.apart.length})`);
    doc.fontSize(9).text(`These lines are part of the case as evidence; their parts and labour (${money(split.amountApart)}) are not in the amount claimed.`);
    doc.moveDown(0.3);
    table(
      doc,
      [{ label: "RO / line", width: 120 }, { label: "Why", width: 310 }, { label: "Parts + labour", width: 80, align: "right" }],
      split.apart.map((x) => [ro(x.lineId), x.why, money(x.amount)]),
    );
  }
}

function attachmentSection(doc: Doc, attachments: readonly PacketAttachment[]) {
  if (attachments.length === 0) return;
  heading(doc, `Attachments (${attachments.length})`);
  const images = attachments.filter((a) => a.data && (a.contentType === "image/png" || a.contentType === "image/jpeg"));
  const others = attachments.filter((a) => !images.includes(a));
  const w = (pageWidth(doc) - 16) / 2;
  const h = 170;
  images.forEach((a, i) => {
    if (i % 2 === 0) ensureSpace(doc, h + 30);
    const col = i % 2;
    const x = MARGIN + col * (w + 16);
    const y = doc.y;
    try {
      doc.image(a.data!, x, y, { fit: [w, h], align: "center", valign: "center" });
    } catch {
      doc.fillColor(ALERT).text("The image could not be embedded.", x, y + h / 2, { width: w });
    }
    doc.rect(x, y, w, h).lineWidth(0.5).strokeColor(LINE).stroke();
    doc.font("regular").fontSize(8).fillColor(MUTED).text(pdfText(`${a.originalName} – uploaded ${a.uploadedAt.slice(0, 10)} by ${a.uploadedBy}`), x, y + h + 3, { width: w });
    doc.fillColor(INK);
    if (col === 1 || i === images.length - 1) doc.y = y + h + 20;
    else doc.y = y;
  });
  doc.x = MARGIN;
  if (others.length) {
    table(
      doc,
      [{ label: "File", width: 220 }, { label: "Type", width: 120 }, { label: "Size", width: 80, align: "right" }],
      others.map((a) => [a.originalName, a.contentType, `${fmt(a.sizeBytes / 1024, 1)} KB`]),
    );
    doc.fontSize(8).fillColor(MUTED).text("Files other than PNG and JPEG images are not shown in this packet; they are kept with the claim.");
    doc.fillColor(INK);
  }
}

/** The story the maker reads first: what was found, what was done, why it is the maker's (parts left empty are left out). */
function narrativeSection(doc: Doc, n: ClaimSnapshotForPacket["narrative"]) {
  const parts: [string, string][] = [["What was found", n.found], ["What was done", n.done], ["Why it is the maker's", n.why]];
  if (!parts.some(([, t]) => t.trim())) return;
  heading(doc, "The claim in words");
  for (const [label, text] of parts) if (text.trim()) paragraph(doc, label, text);
}

function cautionSection(doc: Doc, cautions: readonly string[]) {
  heading(doc, "Safety cautions and limits of the interpretation");
  doc.fontSize(8.5);
  for (const c of cautions) {
    ensureSpace(doc, 24);
    doc.text(pdfText(`• ${c}`), MARGIN, doc.y, { width: pageWidth(doc) });
    doc.moveDown(0.2);
  }
}

/**
 * The claim packet as a PDF: header, machine, repair order (complaint / cause / correction, parts and
 * labour), eligibility with its arithmetic, measurements with their interpretation and the safety
 * cautions, attachment images, and for a campaign case the cluster statistics and its repair lines.
 */
export async function renderPacket(s: ClaimSnapshotForPacket): Promise<Buffer> {
  const { doc, done } = openPdf({ size: "A4", margin: MARGIN, info: { Title: `Warranty claim ${s.claimNumber}`, Author: "Ironledger", Subject: s.title } });

  // header band
  doc.rect(0, 0, doc.page.width, 86).fill("#2f3b4c");
  doc.font("bold").fontSize(9).fillColor("#d39b2a").text("IRONLEDGER · WARRANTY CLAIM PACKET", MARGIN, 22);
  doc.font("bold").fontSize(20).fillColor("#f4f2ec").text(s.claimNumber, MARGIN, 36);
  doc.font("regular").fontSize(10).fillColor("#f4f2ec").text(pdfText(s.title), MARGIN, 62, { width: pageWidth(doc) });
  doc.y = 104;
  doc.fillColor(INK);
  facts(doc, [
    ["Kind", s.kind === "campaign" ? "Campaign case (cluster of failures)" : "Repair claim"],
    ["Status", claimStatusLabels[s.status]],
    ["Shop", s.shopCode ?? "several shops"],
    ["Engine family", s.engineFamily],
    ["Filing deadline", s.deadlineText],
    ["Amount claimed (parts + labour)", money(s.amountClaimed)],
    ["Prepared by", `${s.createdBy} on ${s.createdAt.slice(0, 10)}`],
    ["Sent to", s.warrantyEmail],
    ...(s.policyText ? ([["Warranty policy", s.policyText.charAt(0).toUpperCase() + s.policyText.slice(1)]] as [string, string][]) : []),
  ]);
  if (s.revision && s.revision > 1) paragraph(doc, `Version ${s.revision}: what was corrected`, s.correction ?? "");
  if (s.reason) paragraph(doc, "Maker's reason", s.reason);
  if (s.note) paragraph(doc, "Note", s.note);
  narrativeSection(doc, s.narrative);

  if (s.kind === "repair" && s.lines[0]) {
    const l = s.lines[0];
    machineSection(doc, l);
    repairSection(doc, l);
    eligibilitySection(doc, l);
    measurementSection(doc, l);
  } else {
    clusterSection(doc, s);
  }
  inclusionSection(doc, s);
  attachmentSection(doc, s.attachments);
  cautionSection(doc, s.cautions);

  return finishPdf(doc, done, (page, pages) => `${s.claimNumber} · generated ${s.generatedAt.slice(0, 16).replace("T", " ")} UTC · page ${page} of ${pages}`, {
    margin: MARGIN,
    fromBottom: 30,
  });
}
