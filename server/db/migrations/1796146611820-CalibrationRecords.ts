import type { MigrationInterface, QueryRunner } from 'typeorm';

export class CalibrationRecords1796146611820 implements MigrationInterface {
  name = 'CalibrationRecords1796146611820';

  public async up(queryRunner: QueryRunner): Promise<void> {
    await queryRunner.query(`CREATE TABLE \`sweep\` (\`id\` int NOT NULL AUTO_INCREMENT, \`labId\` int NOT NULL, \`deviceId\` int NOT NULL, \`cooldownId\` int NULL, \`uploadedById\` int NULL, \`kind\` varchar(16) NOT NULL, \`fileNames\` json NOT NULL, \`fileCount\` int NOT NULL, \`byteSize\` int NOT NULL, \`sha256\` char(64) NOT NULL, \`biasUnit\` varchar(32) NULL, \`parseSummary\` json NOT NULL, \`options\` json NOT NULL, \`note\` text NULL, \`createdAt\` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3), INDEX \`IDX_sweep_device\` (\`deviceId\`, \`createdAt\`), PRIMARY KEY (\`id\`)) ENGINE=InnoDB`);
    await queryRunner.query(`CREATE TABLE \`sweep_file\` (\`id\` int NOT NULL AUTO_INCREMENT, \`sweepId\` int NOT NULL, \`position\` int NOT NULL, \`name\` varchar(255) NOT NULL, \`byteSize\` int NOT NULL, \`sha256\` char(64) NOT NULL, \`content\` longblob NOT NULL, UNIQUE INDEX \`UQ_sweep_file_position\` (\`sweepId\`, \`position\`), PRIMARY KEY (\`id\`)) ENGINE=InnoDB`);
    await queryRunner.query(`CREATE TABLE \`fit\` (\`id\` int NOT NULL AUTO_INCREMENT, \`labId\` int NOT NULL, \`deviceId\` int NOT NULL, \`sweepId\` int NOT NULL, \`version\` int NOT NULL, \`kind\` varchar(16) NOT NULL, \`model\` varchar(16) NOT NULL, \`options\` json NOT NULL, \`calibration\` json NOT NULL, \`f0Hz\` double NULL, \`gamma0\` double NULL, \`asymmetry\` double NULL, \`redchi\` double NULL, \`ndata\` int NOT NULL, \`outlierCount\` int NOT NULL, \`success\` tinyint NOT NULL, \`coreVersion\` varchar(32) NOT NULL, \`status\` varchar(16) NOT NULL, \`createdById\` int NULL, \`createdAt\` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3), \`reviewedById\` int NULL, \`reviewedAt\` datetime(3) NULL, \`reviewComment\` text NULL, \`supersededByFitId\` int NULL, \`supersededAt\` datetime(3) NULL, INDEX \`IDX_fit_device_status\` (\`deviceId\`, \`status\`), UNIQUE INDEX \`UQ_fit_device_version\` (\`deviceId\`, \`version\`), PRIMARY KEY (\`id\`)) ENGINE=InnoDB`);
    await queryRunner.query(`CREATE TABLE \`job\` (\`id\` int NOT NULL AUTO_INCREMENT, \`labId\` int NOT NULL, \`type\` varchar(16) NOT NULL, \`status\` varchar(16) NOT NULL, \`progress\` double NOT NULL DEFAULT '0', \`message\` varchar(2000) NULL, \`sweepId\` int NOT NULL, \`fitId\` int NULL, \`options\` json NOT NULL, \`sourceFitId\` int NULL, \`attempts\` int NOT NULL DEFAULT '0', \`createdById\` int NULL, \`createdAt\` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3), \`startedAt\` datetime(3) NULL, \`finishedAt\` datetime(3) NULL, \`updatedAt\` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3) ON UPDATE CURRENT_TIMESTAMP(3), INDEX \`IDX_job_status\` (\`status\`), PRIMARY KEY (\`id\`)) ENGINE=InnoDB`);
    await queryRunner.query(`ALTER TABLE \`sweep\` ADD CONSTRAINT \`FK_eac08db49db690cc72548ae77f1\` FOREIGN KEY (\`labId\`) REFERENCES \`lab\`(\`id\`) ON DELETE CASCADE ON UPDATE NO ACTION`);
    await queryRunner.query(`ALTER TABLE \`sweep\` ADD CONSTRAINT \`FK_278e9be03c2589aab3b5b969932\` FOREIGN KEY (\`deviceId\`) REFERENCES \`device\`(\`id\`) ON DELETE CASCADE ON UPDATE NO ACTION`);
    await queryRunner.query(`ALTER TABLE \`sweep\` ADD CONSTRAINT \`FK_4ec42488404194f6374de59398e\` FOREIGN KEY (\`cooldownId\`) REFERENCES \`cooldown\`(\`id\`) ON DELETE SET NULL ON UPDATE NO ACTION`);
    await queryRunner.query(`ALTER TABLE \`sweep\` ADD CONSTRAINT \`FK_8fb0150f2c6e7834431914ee656\` FOREIGN KEY (\`uploadedById\`) REFERENCES \`user\`(\`id\`) ON DELETE SET NULL ON UPDATE NO ACTION`);
    await queryRunner.query(`ALTER TABLE \`sweep_file\` ADD CONSTRAINT \`FK_892b5a6b4c1f65334f94975941b\` FOREIGN KEY (\`sweepId\`) REFERENCES \`sweep\`(\`id\`) ON DELETE CASCADE ON UPDATE NO ACTION`);
    await queryRunner.query(`ALTER TABLE \`fit\` ADD CONSTRAINT \`FK_93909b4e53b22dc9418e481ab86\` FOREIGN KEY (\`labId\`) REFERENCES \`lab\`(\`id\`) ON DELETE CASCADE ON UPDATE NO ACTION`);
    await queryRunner.query(`ALTER TABLE \`fit\` ADD CONSTRAINT \`FK_2566de9707010d72bfa8743afab\` FOREIGN KEY (\`deviceId\`) REFERENCES \`device\`(\`id\`) ON DELETE CASCADE ON UPDATE NO ACTION`);
    await queryRunner.query(`ALTER TABLE \`fit\` ADD CONSTRAINT \`FK_38c468ada57387d617fd033d57a\` FOREIGN KEY (\`sweepId\`) REFERENCES \`sweep\`(\`id\`) ON DELETE RESTRICT ON UPDATE NO ACTION`);
    await queryRunner.query(`ALTER TABLE \`fit\` ADD CONSTRAINT \`FK_b2ecac32b66da5dc46bdf7cce49\` FOREIGN KEY (\`createdById\`) REFERENCES \`user\`(\`id\`) ON DELETE SET NULL ON UPDATE NO ACTION`);
    await queryRunner.query(`ALTER TABLE \`fit\` ADD CONSTRAINT \`FK_f45690c17cc66fc9127e143c170\` FOREIGN KEY (\`reviewedById\`) REFERENCES \`user\`(\`id\`) ON DELETE SET NULL ON UPDATE NO ACTION`);
    await queryRunner.query(`ALTER TABLE \`job\` ADD CONSTRAINT \`FK_e03abcdae6e9082c664f51bc9fc\` FOREIGN KEY (\`labId\`) REFERENCES \`lab\`(\`id\`) ON DELETE CASCADE ON UPDATE NO ACTION`);
    await queryRunner.query(`ALTER TABLE \`job\` ADD CONSTRAINT \`FK_d7f1c46545eda99c37c8ec4529c\` FOREIGN KEY (\`sweepId\`) REFERENCES \`sweep\`(\`id\`) ON DELETE CASCADE ON UPDATE NO ACTION`);
    await queryRunner.query(`ALTER TABLE \`job\` ADD CONSTRAINT \`FK_228b150b2333ecd5dbf4f7fc1fa\` FOREIGN KEY (\`createdById\`) REFERENCES \`user\`(\`id\`) ON DELETE SET NULL ON UPDATE NO ACTION`);
    // Fits are evidence: after insert only status and the review/supersede fields may change.
    // The services never update anything else; this trigger makes the database refuse it too.
    await queryRunner.query(`CREATE TRIGGER \`fit_immutable\` BEFORE UPDATE ON \`fit\` FOR EACH ROW IF NOT (NEW.\`labId\` <=> OLD.\`labId\` AND NEW.\`deviceId\` <=> OLD.\`deviceId\` AND NEW.\`sweepId\` <=> OLD.\`sweepId\` AND NEW.\`version\` <=> OLD.\`version\` AND NEW.\`kind\` <=> OLD.\`kind\` AND NEW.\`model\` <=> OLD.\`model\` AND NEW.\`options\` <=> OLD.\`options\` AND NEW.\`calibration\` <=> OLD.\`calibration\` AND NEW.\`f0Hz\` <=> OLD.\`f0Hz\` AND NEW.\`gamma0\` <=> OLD.\`gamma0\` AND NEW.\`asymmetry\` <=> OLD.\`asymmetry\` AND NEW.\`redchi\` <=> OLD.\`redchi\` AND NEW.\`ndata\` <=> OLD.\`ndata\` AND NEW.\`outlierCount\` <=> OLD.\`outlierCount\` AND NEW.\`success\` <=> OLD.\`success\` AND NEW.\`coreVersion\` <=> OLD.\`coreVersion\` AND NEW.\`createdAt\` <=> OLD.\`createdAt\`) THEN SIGNAL SQLSTATE '45000' SET MESSAGE_TEXT = 'fit results are immutable: only status and review fields may change'; END IF`);
  }

  public async down(queryRunner: QueryRunner): Promise<void> {
    await queryRunner.query(`DROP TRIGGER IF EXISTS \`fit_immutable\``);
    await queryRunner.query(`ALTER TABLE \`job\` DROP FOREIGN KEY \`FK_228b150b2333ecd5dbf4f7fc1fa\``);
    await queryRunner.query(`ALTER TABLE \`job\` DROP FOREIGN KEY \`FK_d7f1c46545eda99c37c8ec4529c\``);
    await queryRunner.query(`ALTER TABLE \`job\` DROP FOREIGN KEY \`FK_e03abcdae6e9082c664f51bc9fc\``);
    await queryRunner.query(`ALTER TABLE \`fit\` DROP FOREIGN KEY \`FK_f45690c17cc66fc9127e143c170\``);
    await queryRunner.query(`ALTER TABLE \`fit\` DROP FOREIGN KEY \`FK_b2ecac32b66da5dc46bdf7cce49\``);
    await queryRunner.query(`ALTER TABLE \`fit\` DROP FOREIGN KEY \`FK_38c468ada57387d617fd033d57a\``);
    await queryRunner.query(`ALTER TABLE \`fit\` DROP FOREIGN KEY \`FK_2566de9707010d72bfa8743afab\``);
    await queryRunner.query(`ALTER TABLE \`fit\` DROP FOREIGN KEY \`FK_93909b4e53b22dc9418e481ab86\``);
    await queryRunner.query(`ALTER TABLE \`sweep_file\` DROP FOREIGN KEY \`FK_892b5a6b4c1f65334f94975941b\``);
    await queryRunner.query(`ALTER TABLE \`sweep\` DROP FOREIGN KEY \`FK_8fb0150f2c6e7834431914ee656\``);
    await queryRunner.query(`ALTER TABLE \`sweep\` DROP FOREIGN KEY \`FK_4ec42488404194f6374de59398e\``);
    await queryRunner.query(`ALTER TABLE \`sweep\` DROP FOREIGN KEY \`FK_278e9be03c2589aab3b5b969932\``);
    await queryRunner.query(`ALTER TABLE \`sweep\` DROP FOREIGN KEY \`FK_eac08db49db690cc72548ae77f1\``);
    await queryRunner.query(`DROP INDEX \`IDX_job_status\` ON \`job\``);
    await queryRunner.query(`DROP TABLE \`job\``);
    await queryRunner.query(`DROP INDEX \`UQ_fit_device_version\` ON \`fit\``);
    await queryRunner.query(`DROP INDEX \`IDX_fit_device_status\` ON \`fit\``);
    await queryRunner.query(`DROP TABLE \`fit\``);
    await queryRunner.query(`DROP INDEX \`UQ_sweep_file_position\` ON \`sweep_file\``);
    await queryRunner.query(`DROP TABLE \`sweep_file\``);
    await queryRunner.query(`DROP INDEX \`IDX_sweep_device\` ON \`sweep\``);
    await queryRunner.query(`DROP TABLE \`sweep\``);
  }
}
