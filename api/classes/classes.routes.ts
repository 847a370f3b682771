/** Routes of classes, students, invitations, assignments, competencies and notifications. */
import type { Ctx } from '../context';
import type { AssignmentInput, AssignmentPatch, ClassInput, ClassPatch, InvitationAccept, InvitationInput } from '../domain/class-format';
import type { RouteDef } from '../http/route-table';
import { ID, validate } from '../http/validate';
import * as assignmentsUc from './assignments.use-cases';
import * as classesUc from './classes.use-cases';
import { acceptBody, assignmentBody, assignmentPatchBody, classBody, classPatchBody, INVITATION_TOKEN, invitationBody, joinBody, signOffBody, withdrawBody, type SignOffInput } from './classes.schema';
import * as competenciesUc from './competencies.use-cases';
import * as notificationsUc from './notifications.use-cases';

export function classRoutes(ctx: Ctx): RouteDef[] {
  return [
    {
      method: 'get',
      path: '/api/classes',
      access: 'signed-in',
      summary: "The caller's classes: those they teach and those they are in (admins: every class)",
      handler: async (req, res) => {
        res.json(await classesUc.listClasses(ctx, req.signedIn!));
      },
    },
    {
      method: 'post',
      path: '/api/classes',
      access: ['instructor'],
      summary: 'Create a class (the caller is its instructor)',
      validate: validate({ body: classBody }),
      handler: async (req, res) => {
        res.status(201).json(await classesUc.createClass(ctx, req.signedIn!, req.body as ClassInput));
      },
    },
    {
      method: 'get',
      path: '/api/classes/:id',
      access: 'signed-in',
      summary: 'One class: instructor and admins with its roster and invitations; a student with its assignments and their own status',
      validate: validate({ params: { id: ID } }),
      handler: async (req, res) => {
        res.json(await classesUc.getClass(ctx, req.signedIn!, Number(req.params.id)));
      },
    },
    {
      method: 'patch',
      path: '/api/classes/:id',
      access: 'signed-in',
      summary: 'Rename a class, change its term, archive it or bring it back (its instructor)',
      validate: validate({ body: classPatchBody, params: { id: ID } }),
      handler: async (req, res) => {
        res.json(await classesUc.patchClass(ctx, req.signedIn!, Number(req.params.id), req.body as ClassPatch));
      },
    },
    {
      method: 'post',
      path: '/api/classes/:id/invitations',
      access: 'signed-in',
      summary: 'Invite students by e-mail: a single-use link each, mailed (its instructor)',
      validate: validate({ body: invitationBody, params: { id: ID } }),
      handler: async (req, res) => {
        res.status(201).json(await classesUc.invite(ctx, req.signedIn!, Number(req.params.id), (req.body as InvitationInput).emails));
      },
    },
    {
      method: 'delete',
      path: '/api/classes/:id/invitations/:invitationId',
      access: 'signed-in',
      summary: 'Revoke an open invitation (its instructor)',
      validate: validate({ params: { id: ID, invitationId: ID } }),
      handler: async (req, res) => {
        await classesUc.revokeInvitation(ctx, req.signedIn!, Number(req.params.id), Number(req.params.invitationId));
        res.status(204).end();
      },
    },
    {
      method: 'delete',
      path: '/api/classes/:id/students/:studentId',
      access: 'signed-in',
      summary: 'Remove a student from the class; their work stays (its instructor)',
      validate: validate({ params: { id: ID, studentId: ID } }),
      handler: async (req, res) => {
        await classesUc.removeStudent(ctx, req.signedIn!, Number(req.params.id), Number(req.params.studentId));
        res.status(204).end();
      },
    },
    {
      method: 'get',
      path: '/api/class-invitations/:token',
      access: 'public',
      summary: 'What a class invitation link is for (class, instructor, address, state, whether an account exists)',
      validate: validate({ params: { token: INVITATION_TOKEN } }),
      handler: async (req, res) => {
        res.json(await classesUc.previewInvitation(ctx, String(req.params.token)));
      },
    },
    {
      method: 'post',
      path: '/api/class-invitations/:token/accept',
      access: 'public',
      summary: 'Create a student account for the invited address and join the class; answers like sign-in',
      validate: validate({ body: acceptBody, params: { token: INVITATION_TOKEN } }),
      handler: async (req, res) => {
        res.status(201).json(await classesUc.acceptInvitation(ctx, String(req.params.token), req.body as InvitationAccept));
      },
    },
    {
      method: 'post',
      path: '/api/class-invitations/:token/join',
      access: 'signed-in',
      summary: 'The signed-in account of the invited address joins the class',
      validate: validate({ body: joinBody, params: { token: INVITATION_TOKEN } }),
      handler: async (req, res) => {
        res.json(await classesUc.joinWithInvitation(ctx, req.signedIn!, String(req.params.token)));
      },
    },
    {
      method: 'post',
      path: '/api/classes/:id/assignments',
      access: 'signed-in',
      summary: 'Assign a published template version on a training set, due at a time, with a reference survey (its instructor)',
      validate: validate({ body: assignmentBody, params: { id: ID } }),
      handler: async (req, res) => {
        res.status(201).json(await assignmentsUc.createAssignment(ctx, req.signedIn!, Number(req.params.id), req.body as AssignmentInput));
      },
    },
    {
      method: 'patch',
      path: '/api/assignments/:id',
      access: 'signed-in',
      summary: "Change an assignment's title, instructions, due date, reference or options (the class's instructor)",
      validate: validate({ body: assignmentPatchBody, params: { id: ID } }),
      handler: async (req, res) => {
        res.json(await assignmentsUc.patchAssignment(ctx, req.signedIn!, Number(req.params.id), req.body as AssignmentPatch));
      },
    },
    {
      method: 'get',
      path: '/api/competencies',
      access: 'signed-in',
      summary: 'The catalogue of competencies an instructor signs off',
      handler: (_req, res) => {
        res.json(competenciesUc.catalogue());
      },
    },
    {
      method: 'get',
      path: '/api/students/:id/competencies',
      access: 'signed-in',
      summary: "A student's competency record (the student, an instructor of a class they are or were in, admins)",
      validate: validate({ params: { id: ID } }),
      handler: async (req, res) => {
        res.json(await competenciesUc.record(ctx, req.signedIn!, Number(req.params.id)));
      },
    },
    {
      method: 'post',
      path: '/api/students/:id/competencies',
      access: ['instructor'],
      summary: 'Sign off a competency for a student of one of your classes',
      validate: validate({ body: signOffBody, params: { id: ID } }),
      handler: async (req, res) => {
        res.status(201).json(await competenciesUc.signOff(ctx, req.signedIn!, Number(req.params.id), req.body as SignOffInput));
      },
    },
    {
      method: 'post',
      path: '/api/competency-signoffs/:id/withdraw',
      access: 'signed-in',
      summary: 'Withdraw a sign-off with a note (the instructor who signed it, or an admin)',
      validate: validate({ body: withdrawBody, params: { id: ID } }),
      handler: async (req, res) => {
        res.json(await competenciesUc.withdraw(ctx, req.signedIn!, Number(req.params.id), (req.body as { note: string }).note));
      },
    },
    {
      method: 'get',
      path: '/api/notifications',
      access: 'signed-in',
      summary: "The caller's notifications, newest first (100), and how many are unread",
      handler: async (req, res) => {
        res.json(await notificationsUc.listNotifications(ctx, req.signedIn!.id));
      },
    },
    {
      method: 'post',
      path: '/api/notifications/read-all',
      access: 'signed-in',
      summary: "Mark all the caller's notifications read",
      handler: async (req, res) => {
        res.json(await notificationsUc.markAllRead(ctx, req.signedIn!.id));
      },
    },
    {
      method: 'post',
      path: '/api/notifications/:id/read',
      access: 'signed-in',
      summary: 'Mark one of your notifications read',
      validate: validate({ params: { id: ID } }),
      handler: async (req, res) => {
        res.json(await notificationsUc.markRead(ctx, req.signedIn!.id, Number(req.params.id)));
      },
    },
  ];
}
