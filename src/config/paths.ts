/** Every client route path in one place. */
export const paths = {
  home: '/',
  signIn: '/sign-in',
  requestReset: '/reset-password',
  setPassword: '/set-password',
  account: '/account',
  project: (projectId: string) => `/projects/${projectId}`,
  admin: {
    users: '/admin/users',
    projects: '/admin/projects',
    mail: '/admin/mail',
  },
} as const;
