import { demoAccounts, DEMO_PASSWORD } from "./demo-accounts.js";
import { roleLabels } from "../../shared/roles.js";

const esc = (s: string) =>
  s.replace(/[&<>"']/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c]!);

const shell = (title: string, body: string) => `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width,initial-scale=1">
<title>${esc(title)} · Ironledger sign-in</title>
<link rel="icon" href="data:,">
<style>
  :root { --ink:#1d2430; --paper:#f4f2ec; --slate:#3d4a5c; --teal:#1f6f78; --line:#d6d2c6; }
  * { box-sizing: border-box; }
  body { margin:0; font: 15px/1.45 system-ui, sans-serif; color: var(--ink); background: var(--paper); }
  main { max-width: 760px; margin: 48px auto; padding: 0 20px; display: grid; gap: 24px; grid-template-columns: 1fr 1fr; }
  header { grid-column: 1 / -1; display:flex; align-items:center; gap:12px; }
  .mark { width:34px; height:34px; border-radius:6px; background: var(--slate); display:grid; place-items:center; }
  .mark span { width:16px; height:16px; border:3px solid var(--paper); border-radius:2px; transform: rotate(45deg); }
  h1 { font-size: 20px; margin: 0; letter-spacing: .02em; }
  section { background: #fff; border: 1px solid var(--line); border-radius: 10px; padding: 20px; }
  label { display:block; font-weight:600; margin: 12px 0 4px; }
  input { width:100%; padding: 9px 10px; border:1px solid var(--line); border-radius:6px; font: inherit; }
  button { margin-top: 16px; width:100%; padding: 10px; border:0; border-radius:6px; background: var(--teal); color:#fff; font: inherit; font-weight:600; cursor:pointer; }
  .err { color:#9b2c2c; margin-top: 10px; }
  table { width:100%; border-collapse: collapse; font-size: 13px; }
  td, th { text-align:left; padding: 4px 6px; border-bottom: 1px solid var(--line); }
  code { background: #efece4; padding: 1px 4px; border-radius: 4px; }
  @media (max-width: 700px) { main { grid-template-columns: 1fr; } }
</style></head><body><main>
<header><div class="mark" aria-hidden="true"><span></span></div><h1>Ironledger · local sign-in</h1></header>
${body}
</main></body></html>`;

export function loginPage(uid: string, error?: string, username = ""): string {
  const rows = demoAccounts
    .map(
      (a) =>
        `<tr><td><code>${esc(a.username)}</code></td><td>${esc(a.name)}</td><td>${a.roles.map((r) => roleLabels[r]).join(", ")}${
          a.shops.length ? ` · ${esc(a.shops.join(", "))}` : ""
        }</td></tr>`,
    )
    .join("");
  return shell(
    "Sign in",
    `<section>
  <form method="post" action="/interaction/${esc(uid)}/login" autocomplete="off">
    <label for="username">Username</label>
    <input id="username" name="username" value="${esc(username)}" required autofocus>
    <label for="password">Password</label>
    <input id="password" name="password" type="password" required>
    ${error ? `<p class="err" role="alert">${esc(error)}</p>` : ""}
    <button type="submit">Sign in</button>
  </form>
</section>
<section aria-label="Demo accounts">
  <strong>Demo accounts</strong>
  <p>This provider runs on your machine for development. Every account's password is <code>${esc(DEMO_PASSWORD)}</code>.</p>
  <table><thead><tr><th>Username</th><th>Name</th><th>Role</th></tr></thead><tbody>${rows}</tbody></table>
</section>`,
  );
}

export function logoutPage(form: string): string {
  return shell(
    "Sign out",
    `<section style="grid-column:1/-1"><p>Signing you out of the local provider…</p>${form}
<noscript><p>Press the button to finish signing out.</p></noscript></section>
<script>document.forms[0] && document.forms[0].submit();</script>`,
  );
}

/** A request the form could not act on (an expired interaction, a body it will not read), in words. */
export function errorPage(message: string): string {
  return shell("Sign-in problem", `<section style="grid-column:1/-1"><p class="err" role="alert">${esc(message)}</p></section>`);
}

export function signedOutPage(): string {
  return shell("Signed out", `<section style="grid-column:1/-1"><p>You are signed out.</p></section>`);
}
