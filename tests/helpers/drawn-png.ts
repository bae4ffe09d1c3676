import type { Page } from "playwright-core";

/** A small PNG drawn on a canvas in the page itself: a light ground with a bar in `colour` (and an optional second one). */
export async function drawnPng(page: Page, o: { width: number; height: number; colour: string; second?: string }): Promise<Buffer> {
  const dataUrl = await page.evaluate((d) => {
    const c = document.createElement("canvas");
    c.width = d.width;
    c.height = d.height;
    const g = c.getContext("2d")!;
    g.fillStyle = "#e9e4d8";
    g.fillRect(0, 0, d.width, d.height);
    g.fillStyle = d.colour;
    g.fillRect(Math.round(d.width / 8), Math.round(d.height * 0.44), Math.round(d.width * 0.56), Math.round(d.height * 0.12));
    if (d.second) {
      g.fillStyle = d.second;
      g.fillRect(Math.round(d.width * 0.69), Math.round(d.height * 0.4), Math.round(d.width * 0.19), Math.round(d.height * 0.2));
    }
    return c.toDataURL("image/png");
  }, o);
  return Buffer.from(dataUrl.split(",")[1], "base64");
}
