// E-mail about fits. Sending happens after the commit and never fails the request: a lost
// notification is logged, the fit and the review stand.
import type { DataSource } from 'typeorm';
import type { Config } from '../../config';
import type { DeviceRow, FitRow } from '../../db/entities';
import type { Mailer } from '../../mail/mailer';
import { labName } from '../users/repository';
import { headline } from './json';
import { experimentalistsWithPlansOn } from '../planning/repository';
import { activeUsersWithRole, usersById } from './repository';

const deviceLink = (config: Pick<Config, 'appUrl'>, device: DeviceRow) => `${config.appUrl}/devices/${device.id}`;

/** A new proposed fit: every active device engineer of the lab reviews fits. */
export async function notifyFitProposed(
  ds: DataSource,
  mailer: Mailer,
  config: Pick<Config, 'appUrl'>,
  fit: FitRow,
  device: DeviceRow,
  proposerId: number | null,
): Promise<number> {
  const em = ds.manager;
  const [recipients, users, lab] = await Promise.all([
    activeUsersWithRole(em, fit.labId, 'device_engineer'),
    usersById(em, [proposerId]),
    labName(em, fit.labId),
  ]);
  const proposer = proposerId !== null ? users.get(proposerId) : undefined;
  for (const r of recipients) {
    await mailer.sendFitProposed({
      to: r.email,
      name: r.name,
      labName: lab,
      deviceName: device.name,
      version: fit.version,
      model: fit.model,
      kind: fit.kind,
      proposerName: proposer?.name ?? null,
      summary: headline(fit.calibration),
      link: deviceLink(config, device),
    });
  }
  return recipients.length;
}

/**
 * An accepted calibration: the active experimentalists who have saved plans on the device are told
 * (their plans are now stale and can be re-planned). Nobody else: without plans there is no one to
 * tell.
 */
export async function notifyCalibrationAccepted(
  ds: DataSource,
  mailer: Mailer,
  config: Pick<Config, 'appUrl'>,
  fit: FitRow,
  device: DeviceRow,
  reviewerName: string,
): Promise<number> {
  const em = ds.manager;
  const [recipients, lab] = await Promise.all([experimentalistsWithPlansOn(em, fit.labId, device.id), labName(em, fit.labId)]);
  for (const r of recipients) {
    await mailer.sendCalibrationAccepted({
      to: r.email,
      name: r.name,
      labName: lab,
      deviceName: device.name,
      version: fit.version,
      reviewerName,
      comment: fit.reviewComment,
      summary: headline(fit.calibration),
      link: deviceLink(config, device),
    });
  }
  return recipients.length;
}
