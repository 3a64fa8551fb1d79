import { z } from 'zod';
import { endpoint } from './endpoint';
import { loginRequestSchema, loginResponseSchema, sessionSchema } from './auth.schema';
import { forgotPasswordSchema, setPasswordSchema } from './notification.schema';

export const authEndpoints = {
  login: endpoint({
    method: 'post',
    path: '/auth/login',
    summary: 'Sign in',
    access: 'public',
    body: loginRequestSchema,
    answer: loginResponseSchema,
    errors: {
      401: 'Wrong e-mail or password',
      403: 'Account disabled',
      429: 'Too many failed sign-ins',
    },
  }),
  forgotPassword: endpoint({
    method: 'post',
    path: '/auth/forgot',
    summary:
      'Mail a password-reset link; the same answer whether or not the address has an account',
    access: 'public',
    body: forgotPasswordSchema,
    status: 202,
    answer: z.object({ message: z.string() }),
    errors: { 429: 'Too many requests' },
  }),
  setPassword: endpoint({
    method: 'post',
    path: '/auth/set-password',
    summary: 'Choose a password with a mailed link (invitation or reset); single use, expiring',
    access: 'public',
    body: setPasswordSchema,
    answer: loginResponseSchema,
    errors: { 429: 'Too many failed attempts' },
  }),
  session: endpoint({
    method: 'get',
    path: '/auth/me',
    summary: 'The signed-in user and their farm roles',
    answer: sessionSchema,
  }),
};
