// A profiling aid for the readiness roll-up (not part of `npm run bench`):
//
//   node --import tsx docker-free-scripts/bench/profile-readiness.ts [runs]
//
// Keeps a PostgreSQL cluster with the bench's scale data in PROFILE_DIR (default
// $TMPDIR/proofyard-readiness-profile; made on the first run, reused afterwards), then calls the
// roll-up of the 5,000-asset program in this process `runs` times (default 10) and replays its
// statements on a bare pg connection in turns, as the bench does, and prints the medians: the
// service's own time, its SQL time (bare), and the difference, which is JavaScript. Run it with
// `node --cpu-prof --cpu-prof-dir=<dir> --import tsx ...` for a CPU profile of the service.
// PROFILE_STOP=1 stops the cluster at the end.
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import pg from 'pg';
import { QueryTypes } from 'sequelize';
import { parseConfig } from '../../server/config/env';
import { initModels } from '../../server/db/models';
import { migrateUp } from '../../server/db/migrate';
import { createSequelize } from '../../server/db/sequelize';
import type { Deps } from '../../server/deps';
import { programReadiness } from '../../server/services/readiness';
import { ensureDatabase, startCluster } from '../lib/postgres';
import { recordStatements, type Statement } from './api';
import { median } from './common';
import { generateScaleData } from './scale-data';

const ms = (start: bigint) => Number(process.hrtime.bigint() - start) / 1e6;

async function main() {
  const runs = Number(process.argv[2] ?? 10);
  const dir = process.env.PROFILE_DIR ?? path.join(os.tmpdir(), 'proofyard-readiness-profile');
  fs.mkdirSync(dir, { recursive: true });
  fs.chmodSync(dir, 0o755);
  const port = Number(process.env.PROFILE_PGPORT ?? 54391);
  const cluster = await startCluster({ dataDir: path.join(dir, 'pg'), port, durable: false });
  await ensureDatabase(cluster.url('postgres'), 'proofyard_profile');
  const url = cluster.url('proofyard_profile');
  const sequelize = createSequelize(url);
  initModels(sequelize);
  const marker = path.join(dir, 'scale.json');
  if (!fs.existsSync(marker)) {
    console.log('profile: migrating and generating the scale data (once)...');
    await migrateUp(sequelize);
    const scale = await generateScaleData(sequelize, { bcryptRounds: 11 });
    fs.writeFileSync(marker, JSON.stringify({ big: scale.big.id, small: scale.small.id }));
  }
  const { big } = JSON.parse(fs.readFileSync(marker, 'utf8')) as { big: string };
  const [lead] = await sequelize.query<{ id: string; email: string; name: string }>(
    `SELECT u.id, u.email, u.name FROM users u JOIN program_members m ON m.user_id = u.id AND m.program_id = $1 WHERE u.role = 'lead' LIMIT 1`,
    { bind: [big], type: QueryTypes.SELECT },
  );
  const user = { ...lead, role: 'lead' as const, programIds: [big] };
  const config = parseConfig({ DATABASE_URL: url, JWT_SECRET: 'x'.repeat(40), S3_ENDPOINT: 'http://127.0.0.1:1', SMTP_URL: 'smtp://127.0.0.1:1' });
  const deps = { config, sequelize, mailer: {}, storage: {}, log: console.error } as unknown as Deps;
  const client = new pg.Client({ connectionString: url });
  await client.connect();

  // PROFILE_DUMP=<file>: write the answer for a fixed moment, to compare two versions of the service.
  if (process.env.PROFILE_DUMP) {
    const asOf = new Date(Date.parse(`${new Date().toISOString().slice(0, 10)}T12:00:00Z`));
    fs.writeFileSync(process.env.PROFILE_DUMP, JSON.stringify(await programReadiness(deps, user, big, asOf), null, 1));
    console.log(`profile: answer written to ${process.env.PROFILE_DUMP}`);
  }
  let statements: Statement[] = [];
  // CPU time of this process as well as wall time: other work on the machine stretches the wall
  // time of both sides, while this process's own CPU time says what it spent (pg parsing on both sides).
  const cpu = (start: NodeJS.CpuUsage) => {
    const used = process.cpuUsage(start);
    return (used.user + used.system) / 1000;
  };
  const serviceCpu: number[] = [];
  const bareCpu: number[] = [];
  const service = async () => {
    const start = process.hrtime.bigint();
    const c = process.cpuUsage();
    const recorded = await recordStatements(async () => JSON.stringify(await programReadiness(deps, user, big)));
    serviceCpu.push(cpu(c));
    const t = ms(start);
    statements = recorded.statements;
    return { t, bytes: recorded.value.length };
  };
  const bare = async () => {
    const start = process.hrtime.bigint();
    const c = process.cpuUsage();
    for (const s of statements) await client.query(s.text, s.values);
    bareCpu.push(cpu(c));
    return ms(start);
  };
  for (let i = 0; i < 3; i += 1) {
    await service();
    await bare();
  }
  serviceCpu.length = 0;
  bareCpu.length = 0;
  const serviceTimes: number[] = [];
  const bareTimes: number[] = [];
  let bytes = 0;
  for (let i = 0; i < runs; i += 1) {
    const s = await service();
    bytes = s.bytes;
    serviceTimes.push(s.t);
    bareTimes.push(await bare());
  }
  const sv = median(serviceTimes);
  const br = median(bareTimes);
  console.log(`profile: ${statements.length} statements; answer ${(bytes / 1024).toFixed(1)} KiB`);
  console.log(`profile: CPU time of this process: service ${median(serviceCpu).toFixed(1)} ms, bare ${median(bareCpu).toFixed(1)} ms (medians)`);
  console.log(`profile: service ${sv.toFixed(1)} ms, bare SQL ${br.toFixed(1)} ms, ratio ${(sv / br).toFixed(2)}x, outside SQL ${(sv - br).toFixed(1)} ms (medians of ${runs})`);
  // Each statement on its own, with the size of what it returns.
  for (const s of statements) {
    const times: number[] = [];
    let rows = 0;
    let size = 0;
    for (let i = 0; i < Math.min(5, runs); i += 1) {
      const start = process.hrtime.bigint();
      const res = await client.query(s.text, s.values);
      times.push(ms(start));
      rows = res.rowCount ?? 0;
      size = JSON.stringify(res.rows).length;
    }
    console.log(`  ${median(times).toFixed(1).padStart(8)} ms ${String(rows).padStart(7)} rows ${(size / 1024).toFixed(0).padStart(6)} KiB  ${s.text.replace(/\s+/g, ' ').trim().slice(0, 90)}`);
  }
  await client.end();
  await sequelize.close();
  if (process.env.PROFILE_STOP === '1') cluster.stop();
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
