// Demo data: one invented lab with one user of each role, two fabrication batches, five devices
// with design values and one cooldown each. Idempotent: does nothing when the demo lab exists.
//   npx tsx server/db/seed.ts   (migrates first)
import type { DataSource } from 'typeorm';
import type { Role } from '@/shared/api/common';
import type { Geometry } from '@/shared/api/devices';
import { hashPassword } from '../auth/passwords';
import { CooldownEntity, DeviceEntity, FabBatchEntity, LabEntity, UserEntity } from './entities';
import { recordAudit } from '../features/audit/service';

export const DEMO_LAB_NAME = 'Cryo Device Group (demo)';

export const DEMO_USERS: ReadonlyArray<{ email: string; password: string; name: string; role: Role }> = [
  { email: 'lead@demo.fluxwright.test', password: 'demo-lead-2026', name: 'Mira Okonkwo-Lind', role: 'lab_lead' },
  { email: 'engineer@demo.fluxwright.test', password: 'demo-engineer-2026', name: 'Tomas Vireo', role: 'device_engineer' },
  { email: 'experimentalist@demo.fluxwright.test', password: 'demo-exp-2026', name: 'Asha Pellworth', role: 'experimentalist' },
];

const BATCHES = [
  { code: 'NB-2611', wafer: 'W11 (Nb on high-resistivity Si)', fabricatedOn: '2026-03-18', processNotes: 'Nb 150 nm sputtered; Al/AlOx/Al junctions by double-angle evaporation; bridge-free mask.' },
  { code: 'NB-2614', wafer: 'W14 (Nb on sapphire)', fabricatedOn: '2026-05-06', processNotes: 'Same stack as NB-2611 with longer oxidation (lower critical current).' },
];

// Invented design values in the usual range for CPW λ/4 resonators with a dc-SQUID termination:
// Z0 ≈ 50 Ω, f ≈ 4–8 GHz, loop inductance tens of pH (common practice).
const DEVICES: ReadonlyArray<{
  name: string;
  batch: string;
  chipPosition: string;
  geometry: Geometry;
  designZ0Ohm: number;
  designFrequencyHz: number | null;
  loopInductanceH: number;
  fridge: string;
  startedOn: string;
}> = [
  { name: 'Q4-R1', batch: 'NB-2611', chipPosition: 'A3', geometry: 'quarter_wave', designZ0Ohm: 50, designFrequencyHz: 6.02e9, loopInductanceH: 42e-12, fridge: 'Dilution fridge Aster', startedOn: '2026-04-02' },
  { name: 'Q4-R2', batch: 'NB-2611', chipPosition: 'A4', geometry: 'quarter_wave', designZ0Ohm: 50, designFrequencyHz: 6.25e9, loopInductanceH: 42e-12, fridge: 'Dilution fridge Aster', startedOn: '2026-04-02' },
  { name: 'Q4-R3', batch: 'NB-2611', chipPosition: 'B1', geometry: 'quarter_wave', designZ0Ohm: 48.5, designFrequencyHz: 5.87e9, loopInductanceH: 38e-12, fridge: 'Dilution fridge Birch', startedOn: '2026-04-20' },
  { name: 'Q7-L1', batch: 'NB-2614', chipPosition: 'C2', geometry: 'phase_only', designZ0Ohm: 50, designFrequencyHz: null, loopInductanceH: 55e-12, fridge: 'Dilution fridge Birch', startedOn: '2026-05-21' },
  { name: 'Q7-R5', batch: 'NB-2614', chipPosition: 'C5', geometry: 'quarter_wave', designZ0Ohm: 50, designFrequencyHz: 7.35e9, loopInductanceH: 60e-12, fridge: 'Dilution fridge Aster', startedOn: '2026-06-03' },
];

export async function seedDemo(ds: DataSource, opts: { bcryptCost: number }): Promise<{ created: boolean }> {
  if (await ds.getRepository(LabEntity).findOneBy({ name: DEMO_LAB_NAME })) return { created: false };
  const hashes = await Promise.all(DEMO_USERS.map((u) => hashPassword(u.password, opts.bcryptCost)));
  await ds.transaction(async (em) => {
    // Re-check under the transaction: two servers starting at once must not seed twice
    // (the unique lab name makes the loser roll back).
    const lab = await em.getRepository(LabEntity).save({ name: DEMO_LAB_NAME });
    const users = [];
    for (let i = 0; i < DEMO_USERS.length; i++) {
      const u = DEMO_USERS[i];
      users.push(
        await em.getRepository(UserEntity).save({
          labId: lab.id,
          email: u.email,
          name: u.name,
          role: u.role,
          passwordHash: hashes[i],
          active: true,
        }),
      );
    }
    const engineer = users.find((u) => u.role === 'device_engineer')!;
    const batchIds = new Map<string, number>();
    for (const b of BATCHES) {
      const row = await em.getRepository(FabBatchEntity).save({ labId: lab.id, createdById: engineer.id, ...b });
      batchIds.set(b.code, row.id);
    }
    for (const d of DEVICES) {
      const dev = await em.getRepository(DeviceEntity).save({
        labId: lab.id,
        batchId: batchIds.get(d.batch)!,
        name: d.name,
        chipPosition: d.chipPosition,
        geometry: d.geometry,
        designZ0Ohm: d.designZ0Ohm,
        designFrequencyHz: d.designFrequencyHz,
        loopInductanceH: d.loopInductanceH,
        createdById: engineer.id,
      });
      await em.getRepository(CooldownEntity).save({
        deviceId: dev.id,
        startedOn: d.startedOn,
        fridge: d.fridge,
        notes: 'Demo cooldown: mounted in a copper sample box with a flux-bias coil.',
        createdById: engineer.id,
      });
    }
    await recordAudit(em, { labId: lab.id, actorId: null, action: 'demo.seed', subjectType: 'lab', subjectId: lab.id });
  });
  return { created: true };
}

if (require.main === module) {
  void (async () => {
    const { loadConfig } = await import('../config');
    const { createDataSource } = await import('./dataSource');
    const cfg = loadConfig();
    const ds = createDataSource(cfg.db);
    await ds.initialize();
    await ds.runMigrations({ transaction: 'each' });
    const r = await seedDemo(ds, { bcryptCost: cfg.bcryptCost });
    console.log(r.created ? `seeded ${DEMO_LAB_NAME}` : `${DEMO_LAB_NAME} exists: nothing to seed`);
    await ds.destroy();
  })().catch((e) => {
    console.error(e);
    process.exit(1);
  });
}
