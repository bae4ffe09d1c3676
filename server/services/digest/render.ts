import { DIGEST_CAUTION, type Digest } from "../../../shared/schemas/digest.js";

/** HTML text and attribute escaping of the five characters that can change markup (& < > " '). */
export function escapeHtml(s: string): string {
  return s.replace(/[&<>"']/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#x27;" })[c]!);
}

export { DIGEST_CAUTION };

/** The subject of the week's digest. */
export const digestSubject = (weekLabel: string): string => `Ironledger weekly digest, ${weekLabel}`;

/**
 * The digest as a message: a plain-text part and a simple HTML part carrying the same words, every text
 * escaped, every link absolute; the footer says where to change or stop it.
 */
export function renderDigest(d: Digest, to: { name: string }, accountUrl: string): { subject: string; text: string; html: string } {
  const text = [
    `Hello ${to.name},`,
    "",
    `Here is what changed for you in Ironledger, ${d.weekLabel}.`,
    ...d.sections.flatMap((s) => ["", s.title.toUpperCase(), ...s.lines.map((l) => `- ${l}`), ...s.links.map((l) => `${l.label}: ${l.url}`)]),
    "",
    DIGEST_CAUTION,
    "",
    `You get this digest once a week. Change its day or turn it off on your account page: ${accountUrl}`,
  ].join("\n");
  const e = escapeHtml;
  const a = (url: string, label: string) => `<a href="${e(url)}" style="color:#1d4ed8">${e(label)}</a>`;
  const html = [
    "<!doctype html>",
    `<html lang="en"><head><meta charset="utf-8"><title>${e(d.subject)}</title></head>`,
    '<body style="font-family:system-ui,sans-serif;font-size:15px;line-height:1.5;color:#1f2937;max-width:40rem;margin:0 auto;padding:1rem">',
    `<p>Hello ${e(to.name)},</p>`,
    `<p>Here is what changed for you in Ironledger, ${e(d.weekLabel)}.</p>`,
    ...d.sections.map(
      (s) =>
        `<h2 style="font-size:17px;margin:1.5rem 0 .5rem">${e(s.title)}</h2><ul>${s.lines.map((l) => `<li>${e(l)}</li>`).join("")}</ul>` +
        (s.links.length ? `<p>${s.links.map((l) => a(l.url, l.label)).join(" · ")}</p>` : ""),
    ),
    `<p style="font-size:13px;color:#4b5563">${e(DIGEST_CAUTION)}</p>`,
    `<p style="font-size:13px;color:#4b5563">You get this digest once a week. ${a(accountUrl, "Change its day or turn it off on your account page")}.</p>`,
    "</body></html>",
  ].join("\n");
  return { subject: d.subject, text, html };
}
