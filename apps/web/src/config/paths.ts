/** Every client route, used by the router and by links alike. */
export const paths = {
  caseload: { path: '/', getHref: () => '/' },
  patients: { path: '/patients', getHref: () => '/patients' },
  teaching: { path: '/teaching', getHref: () => '/teaching' },
  reviews: { path: '/reviews', getHref: () => '/reviews' },
  drugModels: { path: '/drug-models', getHref: () => '/drug-models' },
  audit: { path: '/audit', getHref: () => '/audit' },
  status: { path: '/status', getHref: () => '/status' },
} as const;
