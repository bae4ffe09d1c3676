/** Path builders, so client and tests never hand-type URLs. */
export const apiPaths = {
  health: () => "/api/health",
  me: () => "/api/me",
  session: () => "/auth/session",
  adminUsers: () => "/api/admin/users",
  shops: () => "/api/shops",
  login: (returnTo?: string) => (returnTo ? `/auth/login?returnTo=${encodeURIComponent(returnTo)}` : "/auth/login"),
  logout: () => "/auth/logout",
} as const;
