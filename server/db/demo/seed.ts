import bcrypt from 'bcrypt';
import type { Sequelize } from 'sequelize';
import type { Role } from '../../../shared/schemas/auth';
import { Program, ProgramMember, User } from '../models';
import type { Config } from '../../config/env';
import { createStorage } from '../../integrations/storage';
import { seedAssets } from './assets-seed';
import { seedFindings } from './findings-seed';
import { seedValidation } from './validation-seed';
import { seedSoftware } from './software-seed';
import { seedFleet } from './fleet-seed';
import { seedReadiness } from './readiness-seed';

/** Demo password shared by every demo account (printed by `npm start`, listed in the README). */
export const DEMO_PASSWORD = 'proofyard-demo';

export const DEMO_SIGN_INS: Array<{ email: string; role: Role; program: string }> = [
  { email: 'technician@fenwater.example', role: 'technician', program: 'FW3' },
  { email: 'engineer@fenwater.example', role: 'engineer', program: 'FW3' },
  { email: 'coordinator@fenwater.example', role: 'coordinator', program: 'FW3' },
  { email: 'driver@fenwater.example', role: 'driver', program: 'FW3' },
  { email: 'lead@fenwater.example', role: 'lead', program: 'FW3' },
  { email: 'admin@fenwater.example', role: 'admin', program: 'FW3' },
  { email: 'technician@marram.example', role: 'technician', program: 'M1' },
  { email: 'lead@marram.example', role: 'lead', program: 'M1' },
  { email: 'admin@marram.example', role: 'admin', program: 'M1' },
];

// Invented people of the fictional programs. The role accounts above carry these names first.
const FENWATER_PEOPLE: Array<[string, Role]> = [
  ['Tamsin Orrell', 'technician'],
  ['Ilkka Varde', 'engineer'],
  ['Priya Semmond', 'coordinator'],
  ['Joss Kettleby', 'driver'],
  ['Maren Aldwick', 'lead'],
  ['Oskar Brenlow', 'admin'],
  ['Dafydd Quarrie', 'technician'],
  ['Lune Haverstock', 'technician'],
  ['Reuben Slaithe', 'technician'],
  ['Noor Castellane', 'technician'],
  ['Bram Edgecote', 'technician'],
  ['Sunniva Parrack', 'engineer'],
  ['Teodor Wyncliffe', 'engineer'],
  ['Ada Morrowby', 'engineer'],
  ['Kasimir Fennick', 'engineer'],
  ['Elin Rusholt', 'coordinator'],
  ['Callum Tarrant-Ives', 'driver'],
  ['Ines Valbrook', 'driver'],
  ['Hollis Grane', 'driver'],
  ['Yara Pendlecott', 'driver'],
  ['Matthias Crewe-Lind', 'driver'],
  ['Sefa Oakhurst', 'driver'],
  ['Wren Halloway', 'lead'],
  ['Piet Amberlane', 'lead'],
  ['Odile Farrensby', 'engineer'],
  ['Ruairi Stenhope', 'technician'],
  ['Keiko Brantwood', 'driver'],
  ['Lorcan Whitsedge', 'technician'],
];
const MARRAM_PEOPLE: Array<[string, Role]> = [
  ['Gisela Trounce', 'technician'],
  ['Anselm Rookwood', 'lead'],
  ['Vesna Dunholme', 'admin'],
  ['Femi Larkspur', 'engineer'],
  ['Corentin Ashby-Vale', 'driver'],
];

const slug = (name: string) => name.toLowerCase().replace(/[^a-z]+/g, '.').replace(/^\.|\.$/g, '');

function emailsFor(people: Array<[string, Role]>, domain: string) {
  const used = new Set<Role>();
  return people.map(([name, role]) => {
    if (!used.has(role)) {
      used.add(role);
      return { name, role, email: `${role}@${domain}` };
    }
    return { name, role, email: `${slug(name)}@${domain}` };
  });
}

export async function databaseIsEmpty(sequelize: Sequelize): Promise<boolean> {
  const [rows] = (await sequelize.query('SELECT count(*)::int AS n FROM users')) as [Array<{ n: number }>, unknown];
  return rows[0].n === 0;
}

export async function seedDemo(sequelize: Sequelize, opts: Pick<Config, 'bcryptRounds' | 's3'>) {
  // One hash for the shared demo password keeps seeding fast (about a quarter second instead of several seconds).
  const passwordHash = await bcrypt.hash(DEMO_PASSWORD, opts.bcryptRounds);
  // The demo photos go to object storage (the S3 fake runs by now); their rows go in with the rest.
  const storage = createStorage(opts.s3);
  try {
    await sequelize.transaction(async (transaction) => {
      const fw3 = await Program.create({ code: 'FW3', name: 'Fenwater Motors FW3' }, { transaction });
      const m1 = await Program.create({ code: 'M1', name: 'Marram Works M1' }, { transaction });
      const people = new Map<string, User[]>();
      for (const [program, list, domain] of [
        [fw3, FENWATER_PEOPLE, 'fenwater.example'],
        [m1, MARRAM_PEOPLE, 'marram.example'],
      ] as const) {
        const users = await User.bulkCreate(
          emailsFor([...list], domain).map((p) => ({ ...p, passwordHash })),
          { transaction, returning: true },
        );
        await ProgramMember.bulkCreate(
          users.map((u) => ({ programId: program.id, userId: u.id })),
          { transaction },
        );
        people.set(program.id, users);
      }
      await seedAssets({ transaction, storage, now: Date.now() }, fw3, people.get(fw3.id)!, m1, people.get(m1.id)!);
      await seedFindings({ transaction, now: Date.now() }, fw3, people.get(fw3.id)!);
      await seedSoftware({ transaction, now: Date.now() }, fw3, people.get(fw3.id)!);
      await seedFleet({ transaction, now: Date.now() }, fw3, people.get(fw3.id)!);
      await seedValidation({ transaction, now: Date.now() }, fw3, people.get(fw3.id)!);
      await seedReadiness({ transaction, now: Date.now() }, [
        { program: fw3, people: people.get(fw3.id)!, history: true },
        { program: m1, people: people.get(m1.id)!, history: false },
      ]);
    });
  } finally {
    storage.close();
  }
}
