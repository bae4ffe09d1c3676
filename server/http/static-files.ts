import express, { type Express } from "express";
import path from "node:path";

/**
 * The built client: files under /assets/ carry a content hash in their names, so they are cached for a year
 * and never revalidated; index.html (served for every client route) is revalidated on every visit so a
 * new release is picked up at once.
 */
export function serveClient(app: Express, dir: string): void {
  app.use("/assets", express.static(path.join(dir, "assets"), { index: false, immutable: true, maxAge: "365d" }));
  // a missing asset is a 404, never the page (which a script tag would try to run)
  app.use("/assets", (_req, res) => void res.status(404).type("text/plain").send("Not found"));
  app.use(express.static(dir, { index: false, maxAge: 0, setHeaders: (res) => res.setHeader("Cache-Control", "no-cache") }));
  app.get("/{*splat}", (_req, res) => {
    res.setHeader("Cache-Control", "no-cache");
    res.sendFile(path.join(dir, "index.html"));
  });
}
