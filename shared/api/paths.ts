export const API = {
  health: '/api/health',
  signIn: '/api/auth/sign-in',
  forgotPassword: '/api/auth/forgot-password',
  setPassword: '/api/auth/set-password',
  me: '/api/me',
  adminUsers: '/api/admin/users',
  adminUser: (id: string) => `/api/admin/users/${id}`,
  adminPrograms: '/api/admin/programs',
  adminProgram: (id: string) => `/api/admin/programs/${id}`,
  adminProgramMembers: (id: string) => `/api/admin/programs/${id}/members`,
  devMail: '/api/dev/mail',
} as const;
