import type { JSONSchemaType } from 'ajv';
import type { Ctx } from '../context';
import type { RouteDef } from '../http/route-table';
import { email, password, personName, token, validate } from '../http/validate';
import * as auth from './auth.use-cases';

interface SignInBody {
  email: string;
  password: string;
}
const signInBody: JSONSchemaType<SignInBody> = {
  type: 'object',
  properties: { email: { type: 'string', minLength: 1, maxLength: 254 }, password: { type: 'string', minLength: 1, maxLength: 200 } },
  required: ['email', 'password'],
  additionalProperties: false,
};
interface TokenBody {
  refreshToken: string;
}
const refreshBody: JSONSchemaType<TokenBody> = {
  type: 'object',
  properties: { refreshToken: token },
  required: ['refreshToken'],
  additionalProperties: false,
};
interface SignUpBody {
  email: string;
  name: string;
  password: string;
}
const signUpBody: JSONSchemaType<SignUpBody> = {
  type: 'object',
  properties: { email, name: personName, password },
  required: ['email', 'name', 'password'],
  additionalProperties: false,
};
const resetRequestBody: JSONSchemaType<{ email: string }> = {
  type: 'object',
  properties: { email },
  required: ['email'],
  additionalProperties: false,
};
const resetConfirmBody: JSONSchemaType<{ token: string; password: string }> = {
  type: 'object',
  properties: { token, password },
  required: ['token', 'password'],
  additionalProperties: false,
};
const acceptBody: JSONSchemaType<{ token: string; name: string; password: string }> = {
  type: 'object',
  properties: { token, name: personName, password },
  required: ['token', 'name', 'password'],
  additionalProperties: false,
};

export function authRoutes(ctx: Ctx): RouteDef[] {
  return [
    {
      method: 'post',
      path: '/api/auth/sign-in',
      access: 'public',
      summary: 'Sign in with e-mail and password',
      validate: validate({ body: signInBody }),
      handler: async (req, res) => {
        const b = req.body as SignInBody;
        res.json(await auth.signIn(ctx, b.email.trim(), b.password, req.ip ?? 'unknown'));
      },
    },
    {
      method: 'post',
      path: '/api/auth/refresh',
      access: 'public',
      summary: 'Rotate a refresh token',
      validate: validate({ body: refreshBody }),
      handler: async (req, res) => {
        res.json(await auth.refresh(ctx, (req.body as TokenBody).refreshToken));
      },
    },
    {
      method: 'post',
      path: '/api/auth/sign-out',
      access: 'public',
      summary: 'Revoke the session of a refresh token',
      validate: validate({ body: refreshBody }),
      handler: async (req, res) => {
        await auth.signOut(ctx, (req.body as TokenBody).refreshToken);
        res.status(204).end();
      },
    },
    {
      method: 'post',
      path: '/api/auth/sign-up',
      access: 'public',
      summary: 'Open self sign-up (technician), when the instance allows it',
      validate: validate({ body: signUpBody }),
      handler: async (req, res) => {
        const b = req.body as SignUpBody;
        res.status(201).json(await auth.signUp(ctx, { ...b, email: b.email.trim() }));
      },
    },
    {
      method: 'post',
      path: '/api/auth/password-reset',
      access: 'public',
      summary: 'Mail a password-reset link (same answer whether or not the e-mail exists)',
      validate: validate({ body: resetRequestBody }),
      handler: async (req, res) => {
        await auth.requestPasswordReset(ctx, (req.body as { email: string }).email.trim());
        res.status(202).json({ status: 'accepted' });
      },
    },
    {
      method: 'post',
      path: '/api/auth/password-reset/confirm',
      access: 'public',
      summary: 'Set a new password with a reset token',
      validate: validate({ body: resetConfirmBody }),
      handler: async (req, res) => {
        const b = req.body as { token: string; password: string };
        await auth.confirmPasswordReset(ctx, b.token, b.password);
        res.status(204).end();
      },
    },
    {
      method: 'get',
      path: '/api/auth/invitations/:token',
      access: 'public',
      summary: 'Read an invitation before accepting it',
      validate: validate({ params: { token: /^[A-Za-z0-9_-]{16,200}$/ } }),
      handler: async (req, res) => {
        res.json(await auth.getInvitation(ctx, String(req.params.token)));
      },
    },
    {
      method: 'post',
      path: '/api/auth/invitations/accept',
      access: 'public',
      summary: 'Accept an invitation: create the account and sign in',
      validate: validate({ body: acceptBody }),
      handler: async (req, res) => {
        res.status(201).json(await auth.acceptInvitation(ctx, req.body as { token: string; name: string; password: string }));
      },
    },
    {
      method: 'get',
      path: '/api/me',
      access: 'signed-in',
      summary: 'The signed-in user',
      handler: (req, res) => {
        const u = req.signedIn!;
        res.json({ id: u.id, email: u.email, name: u.name, roles: u.roles });
      },
    },
  ];
}
