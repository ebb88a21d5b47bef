import { Op, QueryTypes } from 'sequelize';
import type { AdminUser, CreateProgram, InviteUser, ProgramMember as MemberDto, UpdateUser } from '../../shared/schemas/admin';
import { Program, ProgramMember, User } from '../db/models';
import type { Deps } from '../deps';
import { AppError, conflict, notFound } from '../lib/app-error';
import type { SessionUser } from '../middleware/auth';
import { recordHistory } from './history';
import { sendAuthLink, toProgramDto, toUserDto } from './auth';
import { createDefaultStages } from './stages';

/** An admin sees and manages the users of the programs the admin belongs to, and no others. */
async function visibleUserIds(admin: SessionUser): Promise<string[]> {
  const rows = await ProgramMember.findAll({
    attributes: ['userId'],
    where: { programId: { [Op.in]: admin.programIds } },
  });
  return [...new Set(rows.map((r) => r.userId))];
}

async function toAdminUsers(users: User[]): Promise<AdminUser[]> {
  const memberships = await ProgramMember.findAll({ where: { userId: { [Op.in]: users.map((u) => u.id) } } });
  return users.map((u) => ({
    ...toUserDto(u),
    programIds: memberships.filter((m) => m.userId === u.id).map((m) => m.programId),
    invitedPending: u.passwordHash === null,
    version: u.version,
  }));
}

function scopeProgramIds(admin: SessionUser, programIds: string[]) {
  const outside = programIds.filter((id) => !admin.programIds.includes(id));
  if (outside.length) {
    throw new AppError(400, 'request/invalid', 'programIds: Choose only programs you belong to.', {
      fields: { programIds: 'Choose only programs you belong to.' },
    });
  }
}

export async function listUsers(admin: SessionUser) {
  const ids = await visibleUserIds(admin);
  const users = await User.findAll({ where: { id: { [Op.in]: ids } }, order: [['name', 'ASC']] });
  return toAdminUsers(users);
}

export async function getVisibleUser(admin: SessionUser, id: string) {
  if (!/^[0-9a-f-]{36}$/i.test(id)) throw notFound('This user');
  const ids = await visibleUserIds(admin);
  const user = ids.includes(id) ? await User.findByPk(id) : null;
  if (!user) throw notFound('This user');
  return user;
}

export async function inviteUser(deps: Deps, admin: SessionUser, input: InviteUser) {
  scopeProgramIds(admin, input.programIds);
  const existing = await User.findOne({ where: { email: input.email } });
  if (existing) {
    throw new AppError(409, 'admin/email-taken', 'email: A user with this e-mail already exists.', {
      fields: { email: 'A user with this e-mail already exists.' },
    });
  }
  const user = await deps.sequelize.transaction(async (transaction) => {
    const created = await User.create(
      { email: input.email, name: input.name, role: input.role, passwordHash: null },
      { transaction },
    );
    await ProgramMember.bulkCreate(
      input.programIds.map((programId) => ({ programId, userId: created.id })),
      { transaction },
    );
    await recordHistory(
      { programId: null, entityType: 'user', entityId: created.id, action: 'invited', actorId: admin.id, after: { ...toUserDto(created), programIds: input.programIds } },
      transaction,
    );
    await sendAuthLink(deps, created, 'invite', transaction, admin.name);
    return created;
  });
  return (await toAdminUsers([user]))[0];
}

export async function updateUser(deps: Deps, admin: SessionUser, id: string, input: UpdateUser) {
  const user = await getVisibleUser(admin, id);
  if (user.id === admin.id && ((input.role && input.role !== 'admin') || input.active === false)) {
    throw new AppError(400, 'admin/self-change', 'You cannot remove your own administrator role or deactivate yourself.');
  }
  if (input.programIds) scopeProgramIds(admin, input.programIds);
  await deps.sequelize.transaction(async (transaction) => {
    const locked = await User.findByPk(id, { lock: transaction.LOCK.UPDATE, transaction });
    if (!locked) throw notFound('This user');
    if (locked.version !== input.version) {
      throw conflict('Someone else changed this user first.', (await toAdminUsers([locked]))[0]);
    }
    const before = (await toAdminUsers([locked]))[0];
    if (input.role) locked.role = input.role;
    if (input.name) locked.name = input.name;
    if (input.active !== undefined && input.active !== locked.active) {
      locked.active = input.active;
      // Deactivating ends every session at once.
      locked.tokenVersion += 1;
    }
    locked.changed('updatedAt', true);
    await locked.save({ transaction });
    if (input.programIds) {
      await ProgramMember.destroy({
        where: { userId: id, programId: { [Op.in]: admin.programIds, [Op.notIn]: input.programIds } },
        transaction,
      });
      const current = await ProgramMember.findAll({ where: { userId: id }, transaction });
      const toAdd = input.programIds.filter((p) => !current.some((c) => c.programId === p));
      await ProgramMember.bulkCreate(toAdd.map((programId) => ({ programId, userId: id })), { transaction });
    }
    const after = (await toAdminUsers([locked]))[0];
    await recordHistory({ programId: null, entityType: 'user', entityId: id, action: 'updated', actorId: admin.id, before, after }, transaction);
  });
  return (await toAdminUsers([(await User.findByPk(id))!]))[0];
}

export async function listPrograms(admin: SessionUser) {
  const programs = await Program.findAll({ where: { id: { [Op.in]: admin.programIds } }, order: [['code', 'ASC']] });
  const counts = await ProgramMember.count({
    where: { programId: { [Op.in]: admin.programIds } },
    group: ['programId'],
  });
  return programs.map((p) => ({
    ...toProgramDto(p),
    memberCount: Number(counts.find((c) => (c as unknown as { programId: string }).programId === p.id)?.count ?? 0),
  }));
}

export async function createProgram(deps: Deps, admin: SessionUser, input: CreateProgram) {
  return deps.sequelize.transaction(async (transaction) => {
    const program = await Program.create({ code: input.code, name: input.name }, { transaction });
    await ProgramMember.create({ programId: program.id, userId: admin.id }, { transaction });
    const stages = await createDefaultStages(program.id, transaction);
    await recordHistory(
      {
        programId: program.id,
        entityType: 'program',
        entityId: program.id,
        action: 'created',
        actorId: admin.id,
        after: { ...toProgramDto(program), stages: stages.map((s) => s.name) },
      },
      transaction,
    );
    return toProgramDto(program);
  });
}

export async function getProgram(admin: SessionUser, id: string) {
  if (!admin.programIds.includes(id)) throw notFound('This program');
  const program = await Program.findByPk(id);
  if (!program) throw notFound('This program');
  const memberIds = (await ProgramMember.findAll({ where: { programId: id } })).map((m) => m.userId);
  const members = await User.findAll({ where: { id: { [Op.in]: memberIds } }, order: [['name', 'ASC']] });
  return { ...toProgramDto(program), members: members.map(toUserDto) };
}

/**
 * The active members of a program, for any of its members (pickers of owners, watchers and
 * attendees): id, name and role, by name. Another program answers 404 like its other objects.
 */
export async function listProgramMembers(deps: Deps, user: SessionUser, programId: string): Promise<MemberDto[]> {
  if (!user.programIds.includes(programId)) throw notFound('This program');
  return deps.sequelize.query<MemberDto>(
    `SELECT u.id, u.name, u.role FROM users u JOIN program_members pm ON pm.user_id = u.id AND pm.program_id = $1
      WHERE u.active ORDER BY lower(u.name), u.id`,
    { bind: [programId], type: QueryTypes.SELECT },
  );
}

export async function setMembers(deps: Deps, admin: SessionUser, id: string, userIds: string[]) {
  if (!admin.programIds.includes(id)) throw notFound('This program');
  const visible = await visibleUserIds(admin);
  const unknown = userIds.filter((u) => !visible.includes(u));
  if (unknown.length) {
    throw new AppError(400, 'request/invalid', 'userIds: Some of these people are not in your programs.', {
      fields: { userIds: 'Some of these people are not in your programs.' },
    });
  }
  if (!userIds.includes(admin.id)) {
    throw new AppError(400, 'admin/self-change', 'userIds: You cannot remove yourself from a program you administer here.', {
      fields: { userIds: 'Keep yourself in the program.' },
    });
  }
  await deps.sequelize.transaction(async (transaction) => {
    const before = (await ProgramMember.findAll({ where: { programId: id }, transaction })).map((m) => m.userId);
    await ProgramMember.destroy({ where: { programId: id, userId: { [Op.notIn]: userIds } }, transaction });
    const toAdd = userIds.filter((u) => !before.includes(u));
    await ProgramMember.bulkCreate(toAdd.map((userId) => ({ programId: id, userId })), { transaction });
    await recordHistory(
      { programId: id, entityType: 'program', entityId: id, action: 'members-set', actorId: admin.id, before: { userIds: before }, after: { userIds } },
      transaction,
    );
  });
  return getProgram(admin, id);
}
