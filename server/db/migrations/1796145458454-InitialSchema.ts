import type { MigrationInterface, QueryRunner } from 'typeorm';

export class InitialSchema1796145458454 implements MigrationInterface {
  name = 'InitialSchema1796145458454';

  public async up(queryRunner: QueryRunner): Promise<void> {
    await queryRunner.query(`CREATE TABLE \`lab\` (\`id\` int NOT NULL AUTO_INCREMENT, \`name\` varchar(120) NOT NULL, \`createdAt\` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3), UNIQUE INDEX \`IDX_cca07dec2da5b734af2b81f5a3\` (\`name\`), PRIMARY KEY (\`id\`)) ENGINE=InnoDB`);
    await queryRunner.query(`CREATE TABLE \`user\` (\`id\` int NOT NULL AUTO_INCREMENT, \`labId\` int NOT NULL, \`email\` varchar(254) NOT NULL, \`name\` varchar(120) NOT NULL, \`passwordHash\` varchar(100) NOT NULL, \`role\` varchar(32) NOT NULL, \`active\` tinyint NOT NULL DEFAULT 1, \`createdAt\` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3), \`updatedAt\` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3) ON UPDATE CURRENT_TIMESTAMP(3), UNIQUE INDEX \`IDX_e12875dfb3b1d92d7d7c5377e2\` (\`email\`), PRIMARY KEY (\`id\`)) ENGINE=InnoDB`);
    await queryRunner.query(`CREATE TABLE \`invitation\` (\`id\` int NOT NULL AUTO_INCREMENT, \`labId\` int NOT NULL, \`email\` varchar(254) NOT NULL, \`name\` varchar(120) NOT NULL, \`role\` varchar(32) NOT NULL, \`tokenHash\` char(64) NOT NULL, \`invitedById\` int NULL, \`acceptedUserId\` int NULL, \`createdAt\` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3), \`expiresAt\` datetime(3) NOT NULL, \`acceptedAt\` datetime(3) NULL, UNIQUE INDEX \`IDX_676ef6471ce7176869d73365a4\` (\`tokenHash\`), PRIMARY KEY (\`id\`)) ENGINE=InnoDB`);
    await queryRunner.query(`CREATE TABLE \`password_reset\` (\`id\` int NOT NULL AUTO_INCREMENT, \`userId\` int NOT NULL, \`tokenHash\` char(64) NOT NULL, \`createdAt\` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3), \`expiresAt\` datetime(3) NOT NULL, \`usedAt\` datetime(3) NULL, UNIQUE INDEX \`IDX_dc6908de54eb09f588adfdb285\` (\`tokenHash\`), PRIMARY KEY (\`id\`)) ENGINE=InnoDB`);
    await queryRunner.query(`CREATE TABLE \`api_token\` (\`id\` int NOT NULL AUTO_INCREMENT, \`userId\` int NOT NULL, \`name\` varchar(100) NOT NULL, \`tokenHash\` char(64) NOT NULL, \`scopes\` json NOT NULL, \`createdAt\` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3), \`lastUsedAt\` datetime(3) NULL, \`revokedAt\` datetime(3) NULL, UNIQUE INDEX \`IDX_b8d5076cd3f3572829943b3f8a\` (\`tokenHash\`), PRIMARY KEY (\`id\`)) ENGINE=InnoDB`);
    await queryRunner.query(`CREATE TABLE \`audit_event\` (\`id\` int NOT NULL AUTO_INCREMENT, \`labId\` int NULL, \`actorId\` int NULL, \`action\` varchar(64) NOT NULL, \`subjectType\` varchar(32) NULL, \`subjectId\` varchar(64) NULL, \`details\` json NULL, \`createdAt\` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3), PRIMARY KEY (\`id\`)) ENGINE=InnoDB`);
    await queryRunner.query(`CREATE TABLE \`fab_batch\` (\`id\` int NOT NULL AUTO_INCREMENT, \`labId\` int NOT NULL, \`code\` varchar(64) NOT NULL, \`wafer\` varchar(64) NULL, \`processNotes\` text NULL, \`fabricatedOn\` date NULL, \`createdById\` int NULL, \`createdAt\` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3), UNIQUE INDEX \`UQ_fab_batch_lab_code\` (\`labId\`, \`code\`), PRIMARY KEY (\`id\`)) ENGINE=InnoDB`);
    await queryRunner.query(`CREATE TABLE \`device\` (\`id\` int NOT NULL AUTO_INCREMENT, \`labId\` int NOT NULL, \`batchId\` int NOT NULL, \`name\` varchar(64) NOT NULL, \`chipPosition\` varchar(32) NULL, \`geometry\` varchar(16) NOT NULL, \`designZ0Ohm\` double NULL, \`designFrequencyHz\` double NULL, \`loopInductanceH\` double NULL, \`createdById\` int NULL, \`createdAt\` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3), UNIQUE INDEX \`UQ_device_lab_name\` (\`labId\`, \`name\`), PRIMARY KEY (\`id\`)) ENGINE=InnoDB`);
    await queryRunner.query(`CREATE TABLE \`cooldown\` (\`id\` int NOT NULL AUTO_INCREMENT, \`deviceId\` int NOT NULL, \`startedOn\` date NOT NULL, \`fridge\` varchar(64) NOT NULL, \`notes\` text NULL, \`createdById\` int NULL, \`createdAt\` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3), PRIMARY KEY (\`id\`)) ENGINE=InnoDB`);
    await queryRunner.query(`CREATE TABLE \`mail_message\` (\`id\` int NOT NULL AUTO_INCREMENT, \`to\` varchar(1000) NOT NULL, \`from\` varchar(320) NOT NULL, \`subject\` varchar(500) NOT NULL, \`text\` longtext NOT NULL, \`html\` longtext NULL, \`raw\` longtext NOT NULL, \`receivedAt\` datetime(3) NOT NULL, PRIMARY KEY (\`id\`)) ENGINE=InnoDB`);
    await queryRunner.query(`ALTER TABLE \`user\` ADD CONSTRAINT \`FK_66e0e722b95578898051113f60b\` FOREIGN KEY (\`labId\`) REFERENCES \`lab\`(\`id\`) ON DELETE CASCADE ON UPDATE NO ACTION`);
    await queryRunner.query(`ALTER TABLE \`invitation\` ADD CONSTRAINT \`FK_220b53c18a96914d19936428cc6\` FOREIGN KEY (\`labId\`) REFERENCES \`lab\`(\`id\`) ON DELETE CASCADE ON UPDATE NO ACTION`);
    await queryRunner.query(`ALTER TABLE \`invitation\` ADD CONSTRAINT \`FK_603764233ba5c97400836665523\` FOREIGN KEY (\`invitedById\`) REFERENCES \`user\`(\`id\`) ON DELETE SET NULL ON UPDATE NO ACTION`);
    await queryRunner.query(`ALTER TABLE \`invitation\` ADD CONSTRAINT \`FK_c9adb0eb2ac2f96013551dd7dbb\` FOREIGN KEY (\`acceptedUserId\`) REFERENCES \`user\`(\`id\`) ON DELETE SET NULL ON UPDATE NO ACTION`);
    await queryRunner.query(`ALTER TABLE \`password_reset\` ADD CONSTRAINT \`FK_05baebe80e9f8fab8207eda250c\` FOREIGN KEY (\`userId\`) REFERENCES \`user\`(\`id\`) ON DELETE CASCADE ON UPDATE NO ACTION`);
    await queryRunner.query(`ALTER TABLE \`api_token\` ADD CONSTRAINT \`FK_cbfc4e2b85b78207afb0b2d7fbc\` FOREIGN KEY (\`userId\`) REFERENCES \`user\`(\`id\`) ON DELETE CASCADE ON UPDATE NO ACTION`);
    await queryRunner.query(`ALTER TABLE \`audit_event\` ADD CONSTRAINT \`FK_9d78e9a7402441e5eaa4683666c\` FOREIGN KEY (\`labId\`) REFERENCES \`lab\`(\`id\`) ON DELETE CASCADE ON UPDATE NO ACTION`);
    await queryRunner.query(`ALTER TABLE \`audit_event\` ADD CONSTRAINT \`FK_2b778fde3afc04ec59f83e29fa0\` FOREIGN KEY (\`actorId\`) REFERENCES \`user\`(\`id\`) ON DELETE SET NULL ON UPDATE NO ACTION`);
    await queryRunner.query(`ALTER TABLE \`fab_batch\` ADD CONSTRAINT \`FK_99a9a7bff0b406a02e06a6365d7\` FOREIGN KEY (\`labId\`) REFERENCES \`lab\`(\`id\`) ON DELETE CASCADE ON UPDATE NO ACTION`);
    await queryRunner.query(`ALTER TABLE \`fab_batch\` ADD CONSTRAINT \`FK_10e93d34fcb0a6a2280e63c4b14\` FOREIGN KEY (\`createdById\`) REFERENCES \`user\`(\`id\`) ON DELETE SET NULL ON UPDATE NO ACTION`);
    await queryRunner.query(`ALTER TABLE \`device\` ADD CONSTRAINT \`FK_8f661597062f2bf97da94ae324d\` FOREIGN KEY (\`labId\`) REFERENCES \`lab\`(\`id\`) ON DELETE CASCADE ON UPDATE NO ACTION`);
    await queryRunner.query(`ALTER TABLE \`device\` ADD CONSTRAINT \`FK_49dce6061eaa98b4040f505814c\` FOREIGN KEY (\`batchId\`) REFERENCES \`fab_batch\`(\`id\`) ON DELETE RESTRICT ON UPDATE NO ACTION`);
    await queryRunner.query(`ALTER TABLE \`device\` ADD CONSTRAINT \`FK_d355bf1a9e7fbdde3a0a05523b9\` FOREIGN KEY (\`createdById\`) REFERENCES \`user\`(\`id\`) ON DELETE SET NULL ON UPDATE NO ACTION`);
    await queryRunner.query(`ALTER TABLE \`cooldown\` ADD CONSTRAINT \`FK_50d81d6a3a422f8d0385d7317c2\` FOREIGN KEY (\`deviceId\`) REFERENCES \`device\`(\`id\`) ON DELETE CASCADE ON UPDATE NO ACTION`);
    await queryRunner.query(`ALTER TABLE \`cooldown\` ADD CONSTRAINT \`FK_284441cfec0ec6a2597b3be06c5\` FOREIGN KEY (\`createdById\`) REFERENCES \`user\`(\`id\`) ON DELETE SET NULL ON UPDATE NO ACTION`);
  }

  public async down(queryRunner: QueryRunner): Promise<void> {
    await queryRunner.query(`ALTER TABLE \`cooldown\` DROP FOREIGN KEY \`FK_284441cfec0ec6a2597b3be06c5\``);
    await queryRunner.query(`ALTER TABLE \`cooldown\` DROP FOREIGN KEY \`FK_50d81d6a3a422f8d0385d7317c2\``);
    await queryRunner.query(`ALTER TABLE \`device\` DROP FOREIGN KEY \`FK_d355bf1a9e7fbdde3a0a05523b9\``);
    await queryRunner.query(`ALTER TABLE \`device\` DROP FOREIGN KEY \`FK_49dce6061eaa98b4040f505814c\``);
    await queryRunner.query(`ALTER TABLE \`device\` DROP FOREIGN KEY \`FK_8f661597062f2bf97da94ae324d\``);
    await queryRunner.query(`ALTER TABLE \`fab_batch\` DROP FOREIGN KEY \`FK_10e93d34fcb0a6a2280e63c4b14\``);
    await queryRunner.query(`ALTER TABLE \`fab_batch\` DROP FOREIGN KEY \`FK_99a9a7bff0b406a02e06a6365d7\``);
    await queryRunner.query(`ALTER TABLE \`audit_event\` DROP FOREIGN KEY \`FK_2b778fde3afc04ec59f83e29fa0\``);
    await queryRunner.query(`ALTER TABLE \`audit_event\` DROP FOREIGN KEY \`FK_9d78e9a7402441e5eaa4683666c\``);
    await queryRunner.query(`ALTER TABLE \`api_token\` DROP FOREIGN KEY \`FK_cbfc4e2b85b78207afb0b2d7fbc\``);
    await queryRunner.query(`ALTER TABLE \`password_reset\` DROP FOREIGN KEY \`FK_05baebe80e9f8fab8207eda250c\``);
    await queryRunner.query(`ALTER TABLE \`invitation\` DROP FOREIGN KEY \`FK_c9adb0eb2ac2f96013551dd7dbb\``);
    await queryRunner.query(`ALTER TABLE \`invitation\` DROP FOREIGN KEY \`FK_603764233ba5c97400836665523\``);
    await queryRunner.query(`ALTER TABLE \`invitation\` DROP FOREIGN KEY \`FK_220b53c18a96914d19936428cc6\``);
    await queryRunner.query(`ALTER TABLE \`user\` DROP FOREIGN KEY \`FK_66e0e722b95578898051113f60b\``);
    await queryRunner.query(`DROP TABLE \`mail_message\``);
    await queryRunner.query(`DROP TABLE \`cooldown\``);
    await queryRunner.query(`DROP INDEX \`UQ_device_lab_name\` ON \`device\``);
    await queryRunner.query(`DROP TABLE \`device\``);
    await queryRunner.query(`DROP INDEX \`UQ_fab_batch_lab_code\` ON \`fab_batch\``);
    await queryRunner.query(`DROP TABLE \`fab_batch\``);
    await queryRunner.query(`DROP TABLE \`audit_event\``);
    await queryRunner.query(`DROP INDEX \`IDX_b8d5076cd3f3572829943b3f8a\` ON \`api_token\``);
    await queryRunner.query(`DROP TABLE \`api_token\``);
    await queryRunner.query(`DROP INDEX \`IDX_dc6908de54eb09f588adfdb285\` ON \`password_reset\``);
    await queryRunner.query(`DROP TABLE \`password_reset\``);
    await queryRunner.query(`DROP INDEX \`IDX_676ef6471ce7176869d73365a4\` ON \`invitation\``);
    await queryRunner.query(`DROP TABLE \`invitation\``);
    await queryRunner.query(`DROP INDEX \`IDX_e12875dfb3b1d92d7d7c5377e2\` ON \`user\``);
    await queryRunner.query(`DROP TABLE \`user\``);
    await queryRunner.query(`DROP INDEX \`IDX_cca07dec2da5b734af2b81f5a3\` ON \`lab\``);
    await queryRunner.query(`DROP TABLE \`lab\``);
  }
}
