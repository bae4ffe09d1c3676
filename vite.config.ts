import { defineConfig } from "vite";
import react from "@vitejs/plugin-react";
import tailwindcss from "@tailwindcss/vite";
import path from "node:path";

const api = `http://127.0.0.1:${process.env.PORT ?? 8080}`;

export default defineConfig({
  plugins: [react(), tailwindcss()],
  resolve: {
    alias: {
      "@": path.resolve(import.meta.dirname, "src"),
      "@shared": path.resolve(import.meta.dirname, "shared"),
    },
  },
  server: {
    host: "127.0.0.1",
    port: 5173,
    proxy: { "/api": api, "/auth": api },
  },
  build: { outDir: "dist", emptyOutDir: true, chunkSizeWarningLimit: 700 },
});
