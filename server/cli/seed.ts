/**
 * `npm run db:seed`: load the demo club into DATABASE_URL (with --if-empty: only when it is not
 * there yet), then print the demo sign-ins.
 */
import { createDataSource } from '../data-source';
import { hashPassword } from '../lib/passwords';
import { insertDefaultCues } from '../services/cues';
import { DEMO_PASSWORD, demoCueIds, demoGroups, demoSkaters, demoTeam, demoUsers } from '../seed/demo';

async function main() {
  const url = process.env.DATABASE_URL;
  if (!url) throw new Error('DATABASE_URL is required');
  const dataSource = await createDataSource(url, 2).initialize();
  try {
    await dataSource.runMigrations({ transaction: 'each' });
    const present = (await dataSource.query(`SELECT 1 FROM teams WHERE id = $1`, [demoTeam.id])).length > 0;
    if (present && process.argv.includes('--if-empty')) {
      console.log('demo data already present');
    } else {
      const passwordHash = await hashPassword(DEMO_PASSWORD);
      await dataSource.transaction(async (tx) => {
        await tx.query(`DELETE FROM teams WHERE id = $1`, [demoTeam.id]);
        await tx.query(`DELETE FROM users WHERE id = ANY($1::uuid[])`, [demoUsers.map((u) => u.id)]);
        await tx.query(`INSERT INTO teams (id, name) VALUES ($1, $2)`, [demoTeam.id, demoTeam.name]);
        for (const g of demoGroups) {
          await tx.query(`INSERT INTO skater_groups (team_id, id, name, sort_order) VALUES ($1, $2, $3, $4)`, [demoTeam.id, g.id, g.name, g.sortOrder]);
        }
        await tx.query(
          `INSERT INTO skaters (team_id, id, display_name, group_id)
           SELECT $1, * FROM unnest($2::uuid[], $3::text[], $4::uuid[])`,
          [demoTeam.id, demoSkaters.map((s) => s.id), demoSkaters.map((s) => s.displayName), demoSkaters.map((s) => s.groupId)],
        );
        await insertDefaultCues(tx, demoTeam.id, demoCueIds);
        for (const u of demoUsers) {
          await tx.query(`INSERT INTO users (id, email, password_hash, display_name) VALUES ($1, $2, $3, $4)`, [u.id, u.email, passwordHash, u.displayName]);
          await tx.query(`INSERT INTO memberships (team_id, user_id, role, skater_id) VALUES ($1, $2, $3, $4)`, [demoTeam.id, u.id, u.role, u.skaterId]);
          if (u.role === 'skater') {
            await tx.query(`UPDATE skaters SET user_id = $3 WHERE team_id = $1 AND id = $2`, [demoTeam.id, u.skaterId, u.id]);
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
