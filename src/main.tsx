import { StrictMode } from "react";
import { createRoot } from "react-dom/client";
import { QueryClientProvider } from "@tanstack/react-query";
import { RouterProvider } from "react-router-dom";
import { createQueryClient } from "./app/query-client";
import { installZodWords } from "@shared/zod-words";
import { createRouter } from "./app/router";
import "./index.css";

// zod's own messages in words, for every form checked in the browser
installZodWords();

const queryClient = createQueryClient();
const router = createRouter(queryClient);

createRoot(document.getElementById("root")!).render(
  <StrictMode>
    <QueryClientProvider client={queryClient}>
      <RouterProvider router={router} />
    </QueryClientProvider>
  </StrictMode>,
);
