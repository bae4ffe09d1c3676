/**
 * Where each page lives. The router mounts its pages at these patterns, and a page that links to another
 * page reads the path from here: a page never imports the router (that would be an import cycle).
 */
export const pagePaths = {
  overview: "/",
  clusters: "/clusters",
  cluster: "/clusters/:id",
  rates: "/rates",
  life: "/life",
  repairs: "/repairs",
  repair: "/repairs/:id",
  benchSheet: "/bench-sheet",
  benchmarks: "/benchmarks",
  winter: "/winter",
  claims: "/claims",
  claimNew: "/claims/new",
  claim: "/claims/:id",
  adminUsers: "/admin/users",
  adminShops: "/admin/shops",
  adminProfiles: "/admin/profiles",
  adminProfile: "/admin/profiles/:id",
  adminMail: "/admin/mail",
  adminSettings: "/admin/settings",
  adminWarrantyPolicies: "/admin/warranty-policies",
  adminWarrantyPolicy: "/admin/warranty-policies/:family",
  adminEngineSpecs: "/admin/engine-specs",
  imports: "/imports",
  batchRejects: "/imports/batches/:id",
  account: "/account",
} as const;
