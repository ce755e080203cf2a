/**
 * `npm run db:seed`: load the demo club into DATABASE_URL (with --if-empty: only when it is not
 * there yet), then print the demo sign-ins. With --remove: delete the demo club and every account
 * of its e-mail domain instead (their password is published; a server listening beyond loopback
 * refuses to start while they exist, see server/seed/exposure.ts).
 */
import { createDataSource } from '../data-source';
import { hashPassword } from '../lib/passwords';
import { insertDefaultCues } from '../services/cues';
import { nextSeqs } from '../services/sync/counter';
import { DEMO_DOMAIN, DEMO_PASSWORD, demoCueIds, demoGroups, demoSkaters, demoTeam, demoUsers } from '../seed/demo';

async function main() {
  const url = process.env.DATABASE_URL;
  if (!url) throw new Error('DATABASE_URL is required');
  const dataSource = await createDataSource(url, 2).initialize();
  try {
    await dataSource.runMigrations({ transaction: 'each' });
    if (process.argv.includes('--remove')) {
      const removed = await dataSource.transaction(async (tx) => {
        await tx.query(`DELETE FROM teams WHERE id = $1`, [demoTeam.id]);
        const [{ n }]: { n: string }[] = await tx.query(
          `WITH gone AS (DELETE FROM users WHERE id = ANY($1::uuid[]) OR lower(email) LIKE '%@' || $2 RETURNING id)
           SELECT count(*) AS n FROM gone`,
          [demoUsers.map((u) => u.id), DEMO_DOMAIN],
        );
        return Number(n);
      });
      console.log(`removed ${demoTeam.name} and ${removed} demo account(s)`);
      return;
    }
    const present = (await dataSource.query(`SELECT 1 FROM teams WHERE id = $1`, [demoTeam.id])).length > 0;
    if (present && process.argv.includes('--if-empty')) {
      console.log('demo data already present');
    } else {
      const passwordHash = await hashPassword(DEMO_PASSWORD);
      await dataSource.transaction(async (tx) => {
        await tx.query(`DELETE FROM teams WHERE id = $1`, [demoTeam.id]);
        await tx.query(`DELETE FROM users WHERE id = ANY($1::uuid[])`, [demoUsers.map((u) => u.id)]);
        await tx.query(`INSERT INTO teams (id, name) VALUES ($1, $2)`, [demoTeam.id, demoTeam.name]);
        // The team's sync counter: every seeded group, skater and cue draws its server_seq from it.
        await tx.query(`INSERT INTO team_counters (team_id, seq) VALUES ($1, 0)`, [demoTeam.id]);
        const groupSeq = await nextSeqs(tx, demoTeam.id, demoGroups.length);
        for (const [index, g] of demoGroups.entries()) {
          await tx.query(`INSERT INTO skater_groups (team_id, id, name, sort_order, server_seq) VALUES ($1, $2, $3, $4, $5)`, [
            demoTeam.id,
            g.id,
            g.name,
            g.sortOrder,
            groupSeq + index,
          ]);
        }
        const skaterSeq = await nextSeqs(tx, demoTeam.id, demoSkaters.length);
        await tx.query(
          `INSERT INTO skaters (team_id, id, display_name, group_id, server_seq)
           SELECT $1, id, name, group_id, $5::bigint + ord - 1
             FROM unnest($2::uuid[], $3::text[], $4::uuid[]) WITH ORDINALITY AS s(id, name, group_id, ord)`,
          [demoTeam.id, demoSkaters.map((s) => s.id), demoSkaters.map((s) => s.displayName), demoSkaters.map((s) => s.groupId), skaterSeq],
        );
        await insertDefaultCues(tx, demoTeam.id, demoCueIds);
        for (const u of demoUsers) {
          await tx.query(`INSERT INTO users (id, email, password_hash, display_name) VALUES ($1, $2, $3, $4)`, [u.id, u.email, passwordHash, u.displayName]);
          await tx.query(`INSERT INTO memberships (team_id, user_id, role, skater_id) VALUES ($1, $2, $3, $4)`, [demoTeam.id, u.id, u.role, u.skaterId]);
          if (u.role === 'skater') {
            const seq = await nextSeqs(tx, demoTeam.id, 1);
            await tx.query(`UPDATE skaters SET user_id = $3, server_seq = $4 WHERE team_id = $1 AND id = $2`, [demoTeam.id, u.skaterId, u.id, seq]);
          }
        }
      });
      console.log(`seeded ${demoTeam.name}: ${demoSkaters.length} skaters in ${demoGroups.length} groups`);
    }
    console.log(`\n  Demo sign-ins (password for all: ${DEMO_PASSWORD})`);
    for (const u of demoUsers) console.log(`    ${u.role.replace('_', ' ').padEnd(11)} ${u.email}`);
  } finally {
    await dataSource.destroy();
  }
}

main().catch((error) => {
  console.error(error instanceof Error ? error.message : error);
  process.exit(1);
});
