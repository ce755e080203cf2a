/**
 * The demo club: an invented club with invented people, used by `npm start` on first run and by
 * `npm run db:reset`. Ids are fixed so a re-seed gives the same records.
 */
export const DEMO_PASSWORD = 'skate-demo-2026';
export const DEMO_DOMAIN = 'kettlemere-speed.example';

export const demoTeam = { id: '0193a000-0000-7000-8000-000000000001', name: 'Kettlemere Speed Club' };

export const demoGroups = [
  { id: '0193a000-0000-7000-8000-0000000000a1', name: 'Juniors A', sortOrder: 1 },
  { id: '0193a000-0000-7000-8000-0000000000a2', name: 'Juniors B', sortOrder: 2 },
  { id: '0193a000-0000-7000-8000-0000000000a3', name: 'Seniors', sortOrder: 3 },
];

const [juniorsA, juniorsB, seniors] = demoGroups.map((g) => g.id);

export const demoSkaters = [
  ['Fenna Dykstra', juniorsA],
  ['Tijn Brouwer', juniorsA],
  ['Lotte Zandstra', juniorsA],
  ['Sem Kuipers', juniorsA],
  ['Noor Wiersma', juniorsB],
  ['Bram Hoekstra', juniorsB],
  ['Isa Postma', juniorsB],
  ['Daan Terpstra', juniorsB],
  ['Mila Bosma', seniors],
  ['Jesse Veenstra', seniors],
  ['Sara Haanstra', seniors],
  ['Luuk Schaap', seniors],
  ['Roos Kingma', seniors],
].map(([displayName, groupId], index) => ({
  id: `0193a000-0000-7000-8000-0000000001${String(index + 1).padStart(2, '0')}`,
  displayName: displayName!,
  groupId: groupId!,
}));

export const demoUsers = [
  { id: '0193a000-0000-7000-8000-000000000201', displayName: 'Ilse Vandermolen', email: `ilse.vandermolen@${DEMO_DOMAIN}`, role: 'head_coach', skaterId: null },
  { id: '0193a000-0000-7000-8000-000000000202', displayName: 'Joost Verbeek', email: `joost.verbeek@${DEMO_DOMAIN}`, role: 'coach', skaterId: null },
  { id: '0193a000-0000-7000-8000-000000000203', displayName: 'Anouk Brink', email: `anouk.brink@${DEMO_DOMAIN}`, role: 'coach', skaterId: null },
  { id: '0193a000-0000-7000-8000-000000000204', displayName: 'Fenna Dykstra', email: `fenna.dykstra@${DEMO_DOMAIN}`, role: 'skater', skaterId: demoSkaters[0].id },
  { id: '0193a000-0000-7000-8000-000000000205', displayName: 'Gerrit Dykstra', email: `gerrit.dykstra@${DEMO_DOMAIN}`, role: 'guardian', skaterId: demoSkaters[0].id },
] as const;

/** Fixed ids for the demo team's copy of the default cue library. */
export const demoCueIds = Array.from({ length: 64 }, (_, index) => `0193a000-0000-7000-8000-0000000003${String(index).padStart(2, '0')}`);
