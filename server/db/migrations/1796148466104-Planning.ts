import type { MigrationInterface, QueryRunner } from 'typeorm';

export class Planning1796148466104 implements MigrationInterface {
  name = 'Planning1796148466104';

  public async up(queryRunner: QueryRunner): Promise<void> {
    await queryRunner.query(`CREATE TABLE \`plan\` (\`id\` int NOT NULL AUTO_INCREMENT, \`labId\` int NOT NULL, \`deviceId\` int NOT NULL, \`fitId\` int NOT NULL, \`authorId\` int NULL, \`mode\` varchar(8) NOT NULL, \`request\` json NOT NULL, \`result\` json NOT NULL, \`pumpLine\` json NULL, \`filledFromPumpLine\` json NOT NULL, \`predictedPairRate\` double NOT NULL, \`pumpFrequencyHz\` double NOT NULL, \`pumpAmplitudePhi0\` double NOT NULL, \`generatorPowerDbm\` double NULL, \`coreVersion\` varchar(32) NOT NULL, \`replannedFromId\` int NULL, \`createdAt\` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3), INDEX \`IDX_plan_device_created\` (\`deviceId\`, \`createdAt\`), INDEX \`IDX_plan_lab_created\` (\`labId\`, \`createdAt\`), PRIMARY KEY (\`id\`)) ENGINE=InnoDB`);
    await queryRunner.query(`CREATE TABLE \`plan_note\` (\`id\` int NOT NULL AUTO_INCREMENT, \`planId\` int NOT NULL, \`authorId\` int NULL, \`text\` text NOT NULL, \`createdAt\` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3), INDEX \`IDX_plan_note_plan\` (\`planId\`, \`createdAt\`), PRIMARY KEY (\`id\`)) ENGINE=InnoDB`);
    await queryRunner.query(`CREATE TABLE \`pump_line\` (\`id\` int NOT NULL AUTO_INCREMENT, \`labId\` int NOT NULL, \`deviceId\` int NOT NULL, \`dcPeriod\` double NULL, \`attenuationDb\` json NOT NULL, \`stageNames\` json NOT NULL, \`thresholdPowerDbm\` double NULL, \`thresholdBias\` double NULL, \`coldStageLimitW\` double NOT NULL, \`pumpLineZ0Ohm\` double NOT NULL, \`note\` text NULL, \`updatedById\` int NULL, \`updatedAt\` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3) ON UPDATE CURRENT_TIMESTAMP(3), UNIQUE INDEX \`UQ_pump_line_device\` (\`deviceId\`), PRIMARY KEY (\`id\`)) ENGINE=InnoDB`);
    await queryRunner.query(`CREATE TABLE \`spec_window\` (\`id\` int NOT NULL AUTO_INCREMENT, \`labId\` int NOT NULL, \`param\` varchar(64) NOT NULL, \`min\` double NULL, \`max\` double NULL, \`updatedById\` int NULL, \`updatedAt\` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3) ON UPDATE CURRENT_TIMESTAMP(3), UNIQUE INDEX \`UQ_spec_window_lab_param\` (\`labId\`, \`param\`), PRIMARY KEY (\`id\`)) ENGINE=InnoDB`);
    await queryRunner.query(`ALTER TABLE \`plan\` ADD CONSTRAINT \`FK_9da4ed07639cd8321330c5fea2a\` FOREIGN KEY (\`labId\`) REFERENCES \`lab\`(\`id\`) ON DELETE CASCADE ON UPDATE NO ACTION`);
    await queryRunner.query(`ALTER TABLE \`plan\` ADD CONSTRAINT \`FK_37542bd92a4ca77353f4ae0bdd1\` FOREIGN KEY (\`deviceId\`) REFERENCES \`device\`(\`id\`) ON DELETE CASCADE ON UPDATE NO ACTION`);
    await queryRunner.query(`ALTER TABLE \`plan\` ADD CONSTRAINT \`FK_46562491c018e6f5ec31562db6e\` FOREIGN KEY (\`fitId\`) REFERENCES \`fit\`(\`id\`) ON DELETE RESTRICT ON UPDATE NO ACTION`);
    await queryRunner.query(`ALTER TABLE \`plan\` ADD CONSTRAINT \`FK_8b958ee26ea5dc41a20f7760b17\` FOREIGN KEY (\`authorId\`) REFERENCES \`user\`(\`id\`) ON DELETE SET NULL ON UPDATE NO ACTION`);
    await queryRunner.query(`ALTER TABLE \`plan\` ADD CONSTRAINT \`FK_6ad6c43840b2e9f06a608c68d12\` FOREIGN KEY (\`replannedFromId\`) REFERENCES \`plan\`(\`id\`) ON DELETE SET NULL ON UPDATE NO ACTION`);
    await queryRunner.query(`ALTER TABLE \`plan_note\` ADD CONSTRAINT \`FK_b12401c50d94f1333b2cc3f0348\` FOREIGN KEY (\`planId\`) REFERENCES \`plan\`(\`id\`) ON DELETE CASCADE ON UPDATE NO ACTION`);
    await queryRunner.query(`ALTER TABLE \`plan_note\` ADD CONSTRAINT \`FK_fd4d16216eabe00c7856509a534\` FOREIGN KEY (\`authorId\`) REFERENCES \`user\`(\`id\`) ON DELETE SET NULL ON UPDATE NO ACTION`);
    await queryRunner.query(`ALTER TABLE \`pump_line\` ADD CONSTRAINT \`FK_455036d0687e955e229c0d94fc2\` FOREIGN KEY (\`labId\`) REFERENCES \`lab\`(\`id\`) ON DELETE CASCADE ON UPDATE NO ACTION`);
    await queryRunner.query(`ALTER TABLE \`pump_line\` ADD CONSTRAINT \`FK_349c6b6544b0dbc5a20565506e5\` FOREIGN KEY (\`deviceId\`) REFERENCES \`device\`(\`id\`) ON DELETE CASCADE ON UPDATE NO ACTION`);
    await queryRunner.query(`ALTER TABLE \`pump_line\` ADD CONSTRAINT \`FK_98f08c9e1077f5a865a69374536\` FOREIGN KEY (\`updatedById\`) REFERENCES \`user\`(\`id\`) ON DELETE SET NULL ON UPDATE NO ACTION`);
    await queryRunner.query(`ALTER TABLE \`spec_window\` ADD CONSTRAINT \`FK_25633d70ac1fd94a7b407b83ac1\` FOREIGN KEY (\`labId\`) REFERENCES \`lab\`(\`id\`) ON DELETE CASCADE ON UPDATE NO ACTION`);
    await queryRunner.query(`ALTER TABLE \`spec_window\` ADD CONSTRAINT \`FK_1f2223ed27654071f1efb745175\` FOREIGN KEY (\`updatedById\`) REFERENCES \`user\`(\`id\`) ON DELETE SET NULL ON UPDATE NO ACTION`);
    // Plans are records of what was computed from which calibration: nothing of a saved plan may
    // change (notes are separate rows, a re-plan is a new row). The services never update a plan;
    // this trigger makes the database refuse it too. Foreign-key actions (SET NULL when a user or an
    // older plan is deleted) do not fire triggers, so those still work.
    await queryRunner.query(`CREATE TRIGGER \`plan_immutable\` BEFORE UPDATE ON \`plan\` FOR EACH ROW SIGNAL SQLSTATE '45000' SET MESSAGE_TEXT = 'saved plans are immutable: re-plan to make a new one'`);
  }

  public async down(queryRunner: QueryRunner): Promise<void> {
    await queryRunner.query(`DROP TRIGGER IF EXISTS \`plan_immutable\``);
    await queryRunner.query(`ALTER TABLE \`spec_window\` DROP FOREIGN KEY \`FK_1f2223ed27654071f1efb745175\``);
    await queryRunner.query(`ALTER TABLE \`spec_window\` DROP FOREIGN KEY \`FK_25633d70ac1fd94a7b407b83ac1\``);
    await queryRunner.query(`ALTER TABLE \`pump_line\` DROP FOREIGN KEY \`FK_98f08c9e1077f5a865a69374536\``);
    await queryRunner.query(`ALTER TABLE \`pump_line\` DROP FOREIGN KEY \`FK_349c6b6544b0dbc5a20565506e5\``);
    await queryRunner.query(`ALTER TABLE \`pump_line\` DROP FOREIGN KEY \`FK_455036d0687e955e229c0d94fc2\``);
    await queryRunner.query(`ALTER TABLE \`plan_note\` DROP FOREIGN KEY \`FK_fd4d16216eabe00c7856509a534\``);
    await queryRunner.query(`ALTER TABLE \`plan_note\` DROP FOREIGN KEY \`FK_b12401c50d94f1333b2cc3f0348\``);
    await queryRunner.query(`ALTER TABLE \`plan\` DROP FOREIGN KEY \`FK_6ad6c43840b2e9f06a608c68d12\``);
    await queryRunner.query(`ALTER TABLE \`plan\` DROP FOREIGN KEY \`FK_8b958ee26ea5dc41a20f7760b17\``);
    await queryRunner.query(`ALTER TABLE \`plan\` DROP FOREIGN KEY \`FK_46562491c018e6f5ec31562db6e\``);
    await queryRunner.query(`ALTER TABLE \`plan\` DROP FOREIGN KEY \`FK_37542bd92a4ca77353f4ae0bdd1\``);
    await queryRunner.query(`ALTER TABLE \`plan\` DROP FOREIGN KEY \`FK_9da4ed07639cd8321330c5fea2a\``);
    await queryRunner.query(`DROP INDEX \`UQ_spec_window_lab_param\` ON \`spec_window\``);
    await queryRunner.query(`DROP TABLE \`spec_window\``);
    await queryRunner.query(`DROP INDEX \`UQ_pump_line_device\` ON \`pump_line\``);
    await queryRunner.query(`DROP TABLE \`pump_line\``);
    await queryRunner.query(`DROP INDEX \`IDX_plan_note_plan\` ON \`plan_note\``);
    await queryRunner.query(`DROP TABLE \`plan_note\``);
    await queryRunner.query(`DROP INDEX \`IDX_plan_lab_created\` ON \`plan\``);
    await queryRunner.query(`DROP INDEX \`IDX_plan_device_created\` ON \`plan\``);
    await queryRunner.query(`DROP TABLE \`plan\``);
  }
}
