/** Path builders, so client and tests never hand-type URLs. */
export const apiPaths = {
  health: () => "/api/health",
  me: () => "/api/me",
  session: () => "/auth/session",
  adminUsers: () => "/api/admin/users",
  shops: () => "/api/shops",
  benchmarks: (what: "shops" | "funnel" | "trend" | "comebacks", params: Record<string, string | number | undefined> = {}) => {
    const q = new URLSearchParams(Object.entries(params).filter((e): e is [string, string | number] => e[1] !== undefined).map(([k, v]) => [k, String(v)]));
    return `/api/benchmarks/${what}${q.size ? `?${q}` : ""}`;
  },
  login: (returnTo?: string) => (returnTo ? `/auth/login?returnTo=${encodeURIComponent(returnTo)}` : "/auth/login"),
  logout: () => "/auth/logout",
} as const;
