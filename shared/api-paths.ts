/** Path builders, so client and tests never hand-type URLs. */
export const apiPaths = {
  health: () => "/api/health",
  me: () => "/api/me",
  session: () => "/auth/session",
  adminUsers: () => "/api/admin/users",
  adminShops: () => "/api/admin/shops",
  adminShop: (code: string) => `/api/admin/shops/${encodeURIComponent(code)}`,
  shops: () => "/api/shops",
  /** `search` is a query string without "?" (filters, paging, sorting) */
  repairs: (search = "") => `/api/repairs${search ? `?${search}` : ""}`,
  repairsCsv: (search = "") => `/api/repairs.csv${search ? `?${search}` : ""}`,
  repair: (id: string) => `/api/repairs/${encodeURIComponent(id)}`,
  overview: () => "/api/overview",
  clusters: (search = "") => `/api/analytics/clusters${search ? `?${search}` : ""}`,
  cluster: (id: string, search = "") => `/api/analytics/clusters/${encodeURIComponent(id)}${search ? `?${search}` : ""}`,
  rates: (what: "hour-bands" | "temperature-bands" | "components" | "monthly", search = "") => `/api/analytics/rates/${what}${search ? `?${search}` : ""}`,
  life: (what: "weibull" | "kaplan-meier" | "mcf", search = "") => `/api/analytics/life/${what}${search ? `?${search}` : ""}`,
  benchmarks: (what: "shops" | "funnel" | "trend" | "comebacks", params: Record<string, string | number | undefined> = {}) => {
    const q = new URLSearchParams(Object.entries(params).filter((e): e is [string, string | number] => e[1] !== undefined).map(([k, v]) => [k, String(v)]));
    return `/api/benchmarks/${what}${q.size ? `?${q}` : ""}`;
  },
  login: (returnTo?: string) => (returnTo ? `/auth/login?returnTo=${encodeURIComponent(returnTo)}` : "/auth/login"),
  logout: () => "/auth/logout",
  claims: () => "/api/claims",
  claim: (id: string) => `/api/claims/${encodeURIComponent(id)}`,
  claimCandidates: () => "/api/claims/candidates",
  /** `search` is repairLine=… or cluster=… plus the cluster scan's own parameters */
  claimPreview: (search: string) => `/api/claims/preview?${search}`,
  claimStatus: (id: string) => `/api/claims/${encodeURIComponent(id)}/status`,
  claimAttachments: (id: string) => `/api/claims/${encodeURIComponent(id)}/attachments`,
  claimAttachment: (id: string, attachmentId: string) => `/api/claims/${encodeURIComponent(id)}/attachments/${encodeURIComponent(attachmentId)}`,
  claimPacket: (id: string) => `/api/claims/${encodeURIComponent(id)}/packet.pdf`,
  claimLinesCsv: (id: string) => `/api/claims/${encodeURIComponent(id)}/lines.csv`,
  claimSend: (id: string) => `/api/claims/${encodeURIComponent(id)}/send`,
  /** the cluster list a campaign case is picked from (the analytics scan with its default parameters) */
  claimClusterChoices: () => "/api/analytics/clusters",
  adminMail: () => "/api/admin/mail",
  imports: () => "/api/imports",
  importItem: (id: string) => `/api/imports/${encodeURIComponent(id)}`,
  importCheck: (id: string) => `/api/imports/${encodeURIComponent(id)}/check`,
  importLoad: (id: string) => `/api/imports/${encodeURIComponent(id)}/load`,
  importCancel: (id: string) => `/api/imports/${encodeURIComponent(id)}/cancel`,
  importFile: (id: string) => `/api/imports/${encodeURIComponent(id)}/file`,
  batches: (shop?: string) => `/api/batches${shop ? `?shop=${encodeURIComponent(shop)}` : ""}`,
  batchRejects: (id: string, search = "") => `/api/batches/${encodeURIComponent(id)}/rejects${search ? `?${search}` : ""}`,
  batchRejectsCsv: (id: string, search = "") => `/api/batches/${encodeURIComponent(id)}/rejects.csv${search ? `?${search}` : ""}`,
} as const;
