// The demo seed's calibrations: every input kind, accepted/rejected/proposed fits with reviewer
// comments, device statuses computed from the fits; seeding again adds nothing.
import request from 'supertest';
import { seedDemo } from '@/server/db/seed';
import { bearer, signInAs } from '../support/api';
import { startTestServer, type TestServer } from '../support/testServer';
import { closeServer, tableCounts } from '../support/calibration';

let ts: TestServer;
let exp: string;
beforeAll(async () => {
  ts = await startTestServer({ seedDemo: true });
  exp = await signInAs(ts.app, 'experimentalist');
});
afterAll(() => closeServer(ts));

test('demo devices carry their calibration status and the accepted fit in brief', async () => {
  const r = await request(ts.app).get('/api/devices').set(bearer(exp));
  const by = Object.fromEntries(r.body.devices.map((d: { name: string }) => [d.name, d]));
  expect(by['Q4-R1']).toMatchObject({ calibrationStatus: 'accepted', activeCalibration: { version: 1, kind: 'tuning_points', acceptedBy: { name: 'Mira Okonkwo-Lind' } } });
  expect(by['Q4-R2']).toMatchObject({ calibrationStatus: 'accepted', activeCalibration: { version: 2 } });
  expect(by['Q7-L1']).toMatchObject({ calibrationStatus: 'accepted', activeCalibration: { kind: 'phase_flux', model: 'phase', f0Hz: null } });
  expect(by['Q7-R5']).toMatchObject({ calibrationStatus: 'proposed', activeCalibration: null });
  // NB-2614 junctions were oxidised longer (lower I_c): its quarter-wave device has the larger γ0.
  const g = (name: string) => by[name].activeCalibration?.gamma0?.value;
  expect(g('Q4-R1')).toBeGreaterThan(0);
  const r5 = await request(ts.app).get(`/api/devices/${by['Q7-R5'].id}/fits`).set(bearer(exp));
  expect(r5.body.fits[0].gamma0.value).toBeGreaterThan(g('Q4-R1'));
});

test('every input kind is present; one rejected fit with its comment; sweeps keep their files', async () => {
  const kinds = (await ts.dataSource.query('SELECT DISTINCT kind FROM sweep ORDER BY kind')).map((r: { kind: string }) => r.kind);
  expect(kinds).toEqual(['phase_flux', 'raw_complex', 'touchstone', 'tuning_points']);
  const rejected = await ts.dataSource.query("SELECT reviewComment FROM fit WHERE status = 'rejected'");
  expect(rejected).toHaveLength(1);
  expect(rejected[0].reviewComment.length).toBeGreaterThan(10);
  const [ts21] = await ts.dataSource.query("SELECT fileCount FROM sweep WHERE kind = 'touchstone'");
  expect(ts21.fileCount).toBe(21);
  const [orphans] = await ts.dataSource.query('SELECT COUNT(*) AS n FROM sweep s WHERE NOT EXISTS (SELECT 1 FROM sweep_file f WHERE f.sweepId = s.id)');
  expect(Number(orphans.n)).toBe(0);
});

test('seeding again adds no sweeps, fits or jobs', async () => {
  const before = await tableCounts(ts);
  expect(await seedDemo(ts.dataSource, { bcryptCost: 4 })).toEqual({ created: false });
  expect(await tableCounts(ts)).toEqual(before);
});
