/** Every client route path in one place. */
export const paths = {
  home: '/',
  signIn: '/sign-in',
  requestReset: '/reset-password',
  setPassword: '/set-password',
  account: '/account',
  project: (projectId: string) => `/projects/${projectId}`,
  cutterhead: (projectId: string) => `/projects/${projectId}/cutterhead`,
  layout: (projectId: string) => `/projects/${projectId}/layout`,
  position: (projectId: string, positionId: string) => `/projects/${projectId}/positions/${positionId}`,
  cutters: (projectId: string) => `/projects/${projectId}/cutters`,
  cutter: (projectId: string, cutterId: string) => `/projects/${projectId}/cutters/${cutterId}`,
  rounds: (projectId: string) => `/projects/${projectId}/rounds`,
  round: (projectId: string, roundId: string) => `/projects/${projectId}/rounds/${roundId}`,
  forecast: (projectId: string) => `/projects/${projectId}/forecast`,
  wearFits: (projectId: string) => `/projects/${projectId}/wear-fits`,
  admin: {
    users: '/admin/users',
    projects: '/admin/projects',
    mail: '/admin/mail',
  },
} as const;
