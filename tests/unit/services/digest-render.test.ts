import { describe, expect, it } from "vitest";
import { Window } from "happy-dom";
import { DIGEST_CAUTION, escapeHtml, renderDigest } from "../../../server/services/digest/render.js";
import type { Digest } from "../../../shared/schemas/digest.js";

describe("escapeHtml(text)", () => {
  // OWASP Cross Site Scripting Prevention Cheat Sheet, output encoding for HTML contexts (& < > " ' as
  // entities); the expected string is Python's html.escape(s, quote=True) of the same input.
  it("encodes the five characters that change markup, as Python's html.escape does", () => {
    expect(escapeHtml(`<a href="x">Tom & Jerry's</a>`)).toBe("&lt;a href=&quot;x&quot;&gt;Tom &amp; Jerry&#x27;s&lt;/a&gt;");
    expect(escapeHtml("−20 °C · 95 % CI")).toBe("−20 °C · 95 % CI");
  });
});

describe("renderDigest(digest, to, accountUrl)", () => {
  const digest: Digest = {
    week: "2025-W28",
    weekLabel: "week 28, 7–13 July 2025",
    subject: "Ironledger weekly digest, week 28, 7–13 July 2025",
    since: "2025-06-30T00:00:00.000Z",
    sections: [
      {
        key: "findings",
        title: "Findings <new>",
        lines: [`New (status new): lot "X" & <script>alert(1)</script>`],
        links: [{ label: "Open the findings", url: `https://ironledger.invalid/clusters?x="><script>` }],
      },
    ],
  };
  const mail = renderDigest(digest, { name: "O'Neil <admin>" }, "https://ironledger.invalid/account");

  it("writes the same words in the text part and, escaped, in the HTML part: a browser shows them as text", () => {
    expect(mail.subject).toBe(digest.subject);
    expect(mail.text).toContain(`- New (status new): lot "X" & <script>alert(1)</script>`);
    expect(mail.text).toContain(`Open the findings: https://ironledger.invalid/clusters?x="><script>`);
    // parsed by an HTML parser (happy-dom's DOMParser): no element the words could have made, and the words read back intact
    const doc = new new Window().DOMParser().parseFromString(mail.html, "text/html");
    expect(doc.querySelectorAll("script")).toHaveLength(0);
    expect(doc.querySelector("li")!.textContent).toBe(digest.sections[0].lines[0]);
    expect(doc.querySelector("h2")!.textContent).toBe("Findings <new>");
    expect(doc.querySelector("p")!.textContent).toBe("Hello O'Neil <admin>,");
    expect([...doc.querySelectorAll("a")].map((a) => a.getAttribute("href"))).toEqual([digest.sections[0].links[0].url, "https://ironledger.invalid/account"]);
  });

  it("ends with the safety caution and where to change or stop the digest", () => {
    expect(mail.text).toContain(DIGEST_CAUTION);
    expect(mail.text.trimEnd().endsWith("turn it off on your account page: https://ironledger.invalid/account")).toBe(true);
  });
});
