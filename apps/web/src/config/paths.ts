/** Every client route, used by the router and by links alike. */
export const paths = {
  caseload: { path: '/', getHref: () => '/' },
  patients: { path: '/patients', getHref: () => '/patients' },
  patient: {
    path: '/patients/:patientId',
    getHref: (patientId: string) => `/patients/${patientId}`,
  },
  course: {
    path: '/courses/:courseId',
    getHref: (courseId: string) => `/courses/${courseId}`,
  },
  courseFit: {
    path: '/courses/:courseId/fit',
    getHref: (courseId: string) => `/courses/${courseId}/fit`,
  },
  courseRegimens: {
    path: '/courses/:courseId/regimens',
    getHref: (courseId: string) => `/courses/${courseId}/regimens`,
  },
  courseImport: {
    path: '/courses/:courseId/import',
    getHref: (courseId: string) => `/courses/${courseId}/import`,
  },
  plan: {
    path: '/courses/:courseId/plans/:planId',
    getHref: (courseId: string, planId: string) => `/courses/${courseId}/plans/${planId}`,
  },
  reviewPlan: {
    path: '/reviews/:planId',
    getHref: (planId: string) => `/reviews/${planId}`,
  },
  teachingCase: {
    path: '/teaching/:caseId',
    getHref: (caseId: string) => `/teaching/${caseId}`,
  },
  teaching: { path: '/teaching', getHref: () => '/teaching' },
  reviews: { path: '/reviews', getHref: () => '/reviews' },
  drugModels: { path: '/drug-models', getHref: () => '/drug-models' },
  drugModel: {
    path: '/drug-models/:modelId',
    getHref: (modelId: string, version?: number) =>
      `/drug-models/${encodeURIComponent(modelId)}${version ? `?version=${version}` : ''}`,
  },
  audit: { path: '/audit', getHref: () => '/audit' },
  users: { path: '/users', getHref: () => '/users' },
  status: { path: '/status', getHref: () => '/status' },
  signIn: {
    path: '/sign-in',
    getHref: (returnTo?: string) =>
      returnTo && returnTo !== '/'
        ? `/sign-in?returnTo=${encodeURIComponent(returnTo)}`
        : '/sign-in',
  },
  signedOut: { path: '/signed-out', getHref: () => '/signed-out' },
  /** Served by the API: starts the OpenID Connect sign-in, then returns to `returnTo`. */
  authLogin: {
    getHref: (returnTo = '/') => `/auth/login?returnTo=${encodeURIComponent(returnTo)}`,
  },
  /** Served by the API: POST ends the session here and at the identity provider. */
  authLogout: { getHref: () => '/auth/logout' },
} as const;
