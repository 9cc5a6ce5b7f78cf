BEGIN TRANSACTION;
CREATE TABLE alembic_version (
	version_num VARCHAR(32) NOT NULL, 
	CONSTRAINT alembic_version_pkc PRIMARY KEY (version_num)
);
INSERT INTO "alembic_version" VALUES('0003');
CREATE TABLE change_counter (
	name VARCHAR(32) NOT NULL, 
	n BIGINT NOT NULL, 
	CONSTRAINT pk_change_counter PRIMARY KEY (name)
);
INSERT INTO "change_counter" VALUES('structure',2);
INSERT INTO "change_counter" VALUES('listing',6);
INSERT INTO "change_counter" VALUES('vocabulary',0);
CREATE TABLE coalescence (
	id INTEGER NOT NULL, 
	measurement_id INTEGER NOT NULL, 
	tc_k FLOAT NOT NULL, 
	tc_err_k FLOAT, 
	tc_text TEXT NOT NULL, 
	dnu_hz FLOAT NOT NULL, 
	dnu_err_hz FLOAT, 
	dnu_text TEXT NOT NULL, 
	j_hz FLOAT, 
	j_text TEXT, 
	population_ratio FLOAT, 
	population_text TEXT, 
	field_mhz FLOAT, 
	field_text TEXT, 
	CONSTRAINT pk_coalescence PRIMARY KEY (id), 
	CONSTRAINT fk_coalescence_measurement_id_measurement FOREIGN KEY(measurement_id) REFERENCES measurement (id)
);
INSERT INTO "coalescence" VALUES(1,1,300.0,NULL,'300 K',50.0,NULL,'50 Hz',NULL,NULL,NULL,NULL,400.0,'400 MHz');
INSERT INTO "coalescence" VALUES(2,2,300.15,NULL,'27 °C',50.0,NULL,'50 Hz',NULL,NULL,NULL,NULL,400.0,'400 MHz');
INSERT INTO "coalescence" VALUES(3,3,250.0,2.0,'250 ± 2 K',12.0,1.0,'12 ± 1 Hz',14.0,'14 Hz',NULL,NULL,400.0,'400 MHz');
INSERT INTO "coalescence" VALUES(4,4,320.0,NULL,'320 K',80.0,NULL,'80 Hz',NULL,NULL,2.5,'2.5',400.0,'400 MHz');
INSERT INTO "coalescence" VALUES(5,5,343.15,NULL,'70 °C',40.0,NULL,'40 Hz',NULL,NULL,NULL,NULL,400.0,'400 MHz');
INSERT INTO "coalescence" VALUES(6,6,330.0,NULL,'330 K',40.0,NULL,'40 Hz',NULL,NULL,NULL,NULL,400.0,'400 MHz');
INSERT INTO "coalescence" VALUES(7,7,300.0,NULL,'300 K',8000.0,NULL,'8000 Hz',NULL,NULL,NULL,NULL,400.0,'400 MHz');
INSERT INTO "coalescence" VALUES(8,8,300.0,NULL,'300 K',600.0,NULL,'1.5 ppm',NULL,NULL,NULL,NULL,400.0,'400 MHz');
INSERT INTO "coalescence" VALUES(9,9,300.0,NULL,'300 K',20.0,NULL,'20 Hz',NULL,NULL,NULL,NULL,0.04,'40 kHz');
INSERT INTO "coalescence" VALUES(10,1,310.0,NULL,'310 K',95.0,NULL,'95 Hz',NULL,NULL,NULL,NULL,400.0,NULL);
INSERT INTO "coalescence" VALUES(11,24,300.0,NULL,'300 K',50.0,NULL,'50 Hz',NULL,NULL,NULL,NULL,400.0,'400 MHz');
INSERT INTO "coalescence" VALUES(12,25,300.15,NULL,'27 °C',50.0,NULL,'50 Hz',NULL,NULL,NULL,NULL,400.0,'400 MHz');
INSERT INTO "coalescence" VALUES(13,26,250.0,2.0,'250 ± 2 K',12.0,1.0,'12 ± 1 Hz',14.0,'14 Hz',NULL,NULL,400.0,'400 MHz');
INSERT INTO "coalescence" VALUES(14,27,320.0,NULL,'320 K',80.0,NULL,'80 Hz',NULL,NULL,2.5,'2.5',400.0,'400 MHz');
INSERT INTO "coalescence" VALUES(15,28,343.15,NULL,'70 °C',40.0,NULL,'40 Hz',NULL,NULL,NULL,NULL,400.0,'400 MHz');
INSERT INTO "coalescence" VALUES(16,29,330.0,NULL,'330 K',40.0,NULL,'40 Hz',NULL,NULL,NULL,NULL,400.0,'400 MHz');
INSERT INTO "coalescence" VALUES(17,30,300.0,NULL,'300 K',8000.0,NULL,'8000 Hz',NULL,NULL,NULL,NULL,400.0,'400 MHz');
INSERT INTO "coalescence" VALUES(18,31,300.0,NULL,'300 K',600.0,NULL,'1.5 ppm',NULL,NULL,NULL,NULL,400.0,'400 MHz');
INSERT INTO "coalescence" VALUES(19,32,300.0,NULL,'300 K',20.0,NULL,'20 Hz',NULL,NULL,NULL,NULL,0.04,'40 kHz');
INSERT INTO "coalescence" VALUES(20,24,310.0,NULL,'310 K',95.0,NULL,'95 Hz',NULL,NULL,NULL,NULL,400.0,NULL);
CREATE TABLE compound (
	id INTEGER NOT NULL, 
	label VARCHAR(128), 
	name TEXT, 
	smiles_input TEXT, 
	smiles_canonical TEXT, 
	inchi TEXT, 
	inchikey VARCHAR(27), 
	formula VARCHAR(128), 
	net_charge INTEGER, 
	structure_ok BOOLEAN NOT NULL, 
	structure_problem TEXT, 
	mol_binary BLOB, 
	pattern_fp BLOB, 
	notes TEXT, 
	created_at DATETIME NOT NULL, 
	CONSTRAINT pk_compound PRIMARY KEY (id), 
	CONSTRAINT uq_compound_inchikey UNIQUE (inchikey), 
	CONSTRAINT uq_compound_label UNIQUE (label)
);
INSERT INTO "compound" VALUES(1,'A-GH',NULL,NULL,NULL,NULL,NULL,NULL,NULL,1,NULL,NULL,NULL,NULL,'2026-12-04 22:45:47.101817');
INSERT INTO "compound" VALUES(2,'A-KCAL',NULL,NULL,NULL,NULL,NULL,NULL,NULL,1,NULL,NULL,NULL,NULL,'2026-12-04 22:45:47.134345');
INSERT INTO "compound" VALUES(3,'A-AB',NULL,NULL,NULL,NULL,NULL,NULL,NULL,1,NULL,NULL,NULL,NULL,'2026-12-04 22:45:47.153133');
INSERT INTO "compound" VALUES(4,'A-POP',NULL,NULL,NULL,NULL,NULL,NULL,NULL,1,NULL,NULL,NULL,NULL,'2026-12-04 22:45:47.169025');
INSERT INTO "compound" VALUES(5,'A-HOT',NULL,NULL,NULL,NULL,NULL,NULL,NULL,1,NULL,NULL,NULL,NULL,'2026-12-04 22:45:47.259901');
INSERT INTO "compound" VALUES(6,'A-RANGE',NULL,NULL,NULL,NULL,NULL,NULL,NULL,1,NULL,NULL,NULL,NULL,'2026-12-04 22:45:47.276617');
INSERT INTO "compound" VALUES(7,'A-WIDE',NULL,NULL,NULL,NULL,NULL,NULL,NULL,1,NULL,NULL,NULL,NULL,'2026-12-04 22:45:47.290923');
INSERT INTO "compound" VALUES(8,'A-C13',NULL,NULL,NULL,NULL,NULL,NULL,NULL,1,NULL,NULL,NULL,NULL,'2026-12-04 22:45:47.302543');
INSERT INTO "compound" VALUES(9,'A-KHZ',NULL,NULL,NULL,NULL,NULL,NULL,NULL,1,NULL,NULL,NULL,NULL,'2026-12-04 22:45:47.317918');
INSERT INTO "compound" VALUES(10,'A-REFIT',NULL,NULL,NULL,NULL,NULL,NULL,NULL,1,NULL,NULL,NULL,NULL,'2026-12-04 22:45:47.329772');
INSERT INTO "compound" VALUES(11,'A-EA',NULL,NULL,NULL,NULL,NULL,NULL,NULL,0,'hand-edited',NULL,NULL,NULL,'2026-12-04 22:45:47.350648');
INSERT INTO "compound" VALUES(12,'A-EU',NULL,NULL,NULL,NULL,NULL,NULL,NULL,1,NULL,NULL,NULL,NULL,'2026-12-04 22:45:47.366743');
INSERT INTO "compound" VALUES(13,'A-SWAP',NULL,NULL,NULL,NULL,NULL,NULL,NULL,1,NULL,NULL,NULL,NULL,'2026-12-04 22:45:47.382375');
INSERT INTO "compound" VALUES(14,'A-COLD',NULL,NULL,NULL,NULL,NULL,NULL,NULL,1,NULL,NULL,NULL,NULL,'2026-12-04 22:45:47.392829');
INSERT INTO "compound" VALUES(15,'A-LOW',NULL,NULL,NULL,NULL,NULL,NULL,NULL,1,NULL,NULL,NULL,NULL,'2026-12-04 22:45:47.402868');
INSERT INTO "compound" VALUES(16,'A-ZERO',NULL,NULL,NULL,NULL,NULL,NULL,NULL,1,NULL,NULL,NULL,NULL,'2026-12-04 22:45:47.413199');
INSERT INTO "compound" VALUES(17,'A-BAD',NULL,'C(C)(C)(C)(C)COO','CC(C)(C)(C)COO','InChI=1S/C6H15O2/c1-6(2,3,4)5-8-7/h7H,5H2,1-4H3','SGPNFJVPVKXDMG-UHFFFAOYSA-N','C6H15O2',0,0,'RDKit cannot sanitize: Explicit valence for atom # 0 C, 5, is greater than permitted',X'EFBEADDE00000000100000000400000000000000080000000700000080010600280000000605060060000000010306006000000001030600600000000103060060000000010306006000000002020800200000000208006000000001010B000100000200000300000400000500050600060700420000000017040000000000000016',X'080000008040400001000000000000000000000000200000000C00020104002222000000800100000000800000010000200400200031008000002284000502000188200000002000000000020046000000002000020410440000000402008000300400400012000002000000030D000004010108000004208890000000080040000200102002000010004000100000000820004822000800000010000000000100820000000002000000100000240408400300000000100008000008000040400500002520010040000000000000000100200000000002000000000010000000010010080000000080000080000800010000000000020000000000000A000000',NULL,'2026-12-04 22:45:47.458734');
INSERT INTO "compound" VALUES(18,'A-DUP',NULL,NULL,NULL,NULL,NULL,NULL,NULL,1,NULL,NULL,NULL,NULL,'2026-12-04 22:45:47.474336');
INSERT INTO "compound" VALUES(19,'A-SLOW',NULL,NULL,NULL,NULL,NULL,NULL,NULL,1,NULL,NULL,NULL,NULL,'2026-12-04 22:45:47.517031');
INSERT INTO "compound" VALUES(20,'A-GONE',NULL,NULL,NULL,NULL,NULL,NULL,NULL,1,NULL,NULL,NULL,NULL,'2026-12-04 22:45:47.524904');
INSERT INTO "compound" VALUES(21,'B-GH',NULL,NULL,NULL,NULL,NULL,NULL,NULL,1,NULL,NULL,NULL,NULL,'2026-12-04 22:45:47.565584');
INSERT INTO "compound" VALUES(22,'B-KCAL',NULL,NULL,NULL,NULL,NULL,NULL,NULL,1,NULL,NULL,NULL,NULL,'2026-12-04 22:45:47.576133');
INSERT INTO "compound" VALUES(23,'B-AB',NULL,NULL,NULL,NULL,NULL,NULL,NULL,1,NULL,NULL,NULL,NULL,'2026-12-04 22:45:47.591673');
INSERT INTO "compound" VALUES(24,'B-POP',NULL,NULL,NULL,NULL,NULL,NULL,NULL,1,NULL,NULL,NULL,NULL,'2026-12-04 22:45:47.610371');
INSERT INTO "compound" VALUES(25,'B-HOT',NULL,NULL,NULL,NULL,NULL,NULL,NULL,1,NULL,NULL,NULL,NULL,'2026-12-04 22:45:47.628672');
INSERT INTO "compound" VALUES(26,'B-RANGE',NULL,NULL,NULL,NULL,NULL,NULL,NULL,1,NULL,NULL,NULL,NULL,'2026-12-04 22:45:47.650839');
INSERT INTO "compound" VALUES(27,'B-WIDE',NULL,NULL,NULL,NULL,NULL,NULL,NULL,1,NULL,NULL,NULL,NULL,'2026-12-04 22:45:47.676101');
INSERT INTO "compound" VALUES(28,'B-C13',NULL,NULL,NULL,NULL,NULL,NULL,NULL,1,NULL,NULL,NULL,NULL,'2026-12-04 22:45:47.688142');
INSERT INTO "compound" VALUES(29,'B-KHZ',NULL,NULL,NULL,NULL,NULL,NULL,NULL,1,NULL,NULL,NULL,NULL,'2026-12-04 22:45:47.705946');
INSERT INTO "compound" VALUES(30,'B-REFIT',NULL,NULL,NULL,NULL,NULL,NULL,NULL,1,NULL,NULL,NULL,NULL,'2026-12-04 22:45:47.717056');
INSERT INTO "compound" VALUES(31,'B-EA',NULL,NULL,NULL,NULL,NULL,NULL,NULL,0,'hand-edited',NULL,NULL,NULL,'2026-12-04 22:45:47.738841');
INSERT INTO "compound" VALUES(32,'B-EU',NULL,NULL,NULL,NULL,NULL,NULL,NULL,1,NULL,NULL,NULL,NULL,'2026-12-04 22:45:47.749771');
INSERT INTO "compound" VALUES(33,'B-SWAP',NULL,NULL,NULL,NULL,NULL,NULL,NULL,1,NULL,NULL,NULL,NULL,'2026-12-04 22:45:47.766121');
INSERT INTO "compound" VALUES(34,'B-COLD',NULL,NULL,NULL,NULL,NULL,NULL,NULL,1,NULL,NULL,NULL,NULL,'2026-12-04 22:45:47.777319');
INSERT INTO "compound" VALUES(35,'B-LOW',NULL,NULL,NULL,NULL,NULL,NULL,NULL,1,NULL,NULL,NULL,NULL,'2026-12-04 22:45:47.793368');
INSERT INTO "compound" VALUES(36,'B-ZERO',NULL,NULL,NULL,NULL,NULL,NULL,NULL,1,NULL,NULL,NULL,NULL,'2026-12-04 22:45:47.808490');
INSERT INTO "compound" VALUES(37,'B-BAD',NULL,'C(C)(C)(C)(C)COOO','CC(C)(C)(C)COOO','InChI=1S/C6H15O3/c1-6(2,3,4)5-8-9-7/h7H,5H2,1-4H3','ZMYPMWBLIXGRIZ-UHFFFAOYSA-N','C6H15O3',0,0,'RDKit cannot sanitize: Explicit valence for atom # 0 C, 5, is greater than permitted',X'EFBEADDE0000000010000000040000000000000009000000080000008001060028000000060506006000000001030600600000000103060060000000010306006000000001030600600000000202080020000000020800200000000208006000000001010B000100000200000300000400000500050600060700070800420000000017040000000000000016',X'080000008040400001000000000004000000000000200000000C00020104002222000000800100000000800000010000200400200031008000002284000502000188200000002000000008020046000000002000020410440000000402008000300400400012000002000000030D000004010108000004208890000000080040000200102002000010004000100000000820004822000800000010000000000100820000000002000000100000240408400300000080100008000008000040400500002520010040000100000200000100200000000002000000000010000000010010080000000080000080000800010000000000020000000000000A000000',NULL,'2026-12-04 22:45:47.822779');
INSERT INTO "compound" VALUES(38,'B-DUP',NULL,NULL,NULL,NULL,NULL,NULL,NULL,1,NULL,NULL,NULL,NULL,'2026-12-04 22:45:47.838424');
INSERT INTO "compound" VALUES(39,'B-SLOW',NULL,NULL,NULL,NULL,NULL,NULL,NULL,1,NULL,NULL,NULL,NULL,'2026-12-04 22:45:47.907669');
INSERT INTO "compound" VALUES(40,'B-GONE',NULL,NULL,NULL,NULL,NULL,NULL,NULL,1,NULL,NULL,NULL,NULL,'2026-12-04 22:45:47.919021');
CREATE TABLE import_batch (
	id INTEGER NOT NULL, 
	file_name TEXT NOT NULL, 
	sha256 VARCHAR(64) NOT NULL, 
	sheet TEXT, 
	actor VARCHAR(128) NOT NULL, 
	started_at DATETIME NOT NULL, 
	finished_at DATETIME, 
	rows_total INTEGER NOT NULL, 
	rows_added INTEGER NOT NULL, 
	rows_updated INTEGER NOT NULL, 
	rows_unchanged INTEGER NOT NULL, 
	rows_rejected INTEGER NOT NULL, 
	status VARCHAR(16) NOT NULL, 
	CONSTRAINT pk_import_batch PRIMARY KEY (id)
);
CREATE TABLE measurement (
	id INTEGER NOT NULL, 
	compound_id INTEGER NOT NULL, 
	process_id INTEGER, 
	label VARCHAR(128), 
	method VARCHAR(32) NOT NULL, 
	solvent_id INTEGER, 
	solvent_text TEXT, 
	field_mhz FLOAT, 
	field_text TEXT, 
	t_min_k FLOAT, 
	t_min_text TEXT, 
	t_max_k FLOAT, 
	t_max_text TEXT, 
	dg_kj_mol FLOAT, 
	dg_err_kj_mol FLOAT, 
	dg_text TEXT, 
	dg_t_k FLOAT, 
	dg_t_text TEXT, 
	dh_kj_mol FLOAT, 
	dh_err_kj_mol FLOAT, 
	dh_text TEXT, 
	ds_j_mol_k FLOAT, 
	ds_err_j_mol_k FLOAT, 
	ds_text TEXT, 
	ea_kj_mol FLOAT, 
	ea_err_kj_mol FLOAT, 
	ea_text TEXT, 
	log10_a FLOAT, 
	log10_a_err FLOAT, 
	log10_a_text TEXT, 
	reference TEXT, 
	extra_json TEXT, 
	entered_by VARCHAR(128) NOT NULL, 
	entered_at DATETIME NOT NULL, 
	updated_at DATETIME, 
	status VARCHAR(16) NOT NULL, 
	batch_id INTEGER, 
	source_row INTEGER, 
	CONSTRAINT pk_measurement PRIMARY KEY (id), 
	CONSTRAINT fk_measurement_batch_id_import_batch FOREIGN KEY(batch_id) REFERENCES import_batch (id), 
	CONSTRAINT fk_measurement_compound_id_compound FOREIGN KEY(compound_id) REFERENCES compound (id), 
	CONSTRAINT fk_measurement_process_id_process FOREIGN KEY(process_id) REFERENCES process (id), 
	CONSTRAINT fk_measurement_solvent_id_solvent FOREIGN KEY(solvent_id) REFERENCES solvent (id)
);
INSERT INTO "measurement" VALUES(1,1,1,NULL,'coalescence',5,'toluene-d8',400.0,'400 MHz',NULL,NULL,NULL,NULL,61.74,NULL,'61.74 kJ/mol',300.0,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,'tester','2026-12-04 22:45:47.101817',NULL,'draft',NULL,NULL);
INSERT INTO "measurement" VALUES(2,2,2,NULL,'coalescence',5,'toluene-d8',400.0,'400 MHz',NULL,NULL,NULL,NULL,2.58320160000000043965e+02,NULL,'14.76',300.15,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,'tester','2026-12-04 22:45:47.134345',NULL,'draft',NULL,NULL);
INSERT INTO "measurement" VALUES(3,3,3,NULL,'coalescence',5,'toluene-d8',400.0,'400 MHz',220.0,'220 K',280.0,'280 K',55.0,0.5,'55.0 ± 0.5 kJ/mol',250.0,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,'tester','2026-12-04 22:45:47.153133',NULL,'draft',NULL,NULL);
INSERT INTO "measurement" VALUES(4,4,4,NULL,'coalescence',5,'toluene-d8',400.0,'400 MHz',NULL,NULL,NULL,NULL,70.0,NULL,'70 kJ/mol',298.0,'298 K',NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,'tester','2026-12-04 22:45:47.169025',NULL,'draft',NULL,NULL);
INSERT INTO "measurement" VALUES(5,5,5,NULL,'coalescence',1,'CDCl3',400.0,'400 MHz',NULL,NULL,NULL,NULL,69.036,NULL,'16.5 kcal/mol',343.15,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,'tester','2026-12-04 22:45:47.259901',NULL,'draft',NULL,NULL);
INSERT INTO "measurement" VALUES(6,6,6,NULL,'coalescence',5,'toluene-d8',400.0,'400 MHz',250.0,'250 K',320.0,'320 K',67.0,NULL,'67 kJ/mol',330.0,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,'tester','2026-12-04 22:45:47.276617',NULL,'draft',NULL,NULL);
INSERT INTO "measurement" VALUES(7,7,7,NULL,'coalescence',5,'toluene-d8',400.0,'400 MHz',NULL,NULL,NULL,NULL,50.0,NULL,'50 kJ/mol',300.0,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,'tester','2026-12-04 22:45:47.290923',NULL,'draft',NULL,NULL);
INSERT INTO "measurement" VALUES(8,8,8,NULL,'coalescence',5,'toluene-d8',400.0,'400 MHz',NULL,NULL,NULL,NULL,60.0,NULL,'60 kJ/mol',300.0,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,'tester','2026-12-04 22:45:47.302543',NULL,'draft',NULL,NULL);
INSERT INTO "measurement" VALUES(9,9,9,NULL,'coalescence',5,'toluene-d8',0.04,'40 kHz',NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,'tester','2026-12-04 22:45:47.317918',NULL,'draft',NULL,NULL);
INSERT INTO "measurement" VALUES(10,10,10,NULL,'lineshape',5,'toluene-d8',NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,65.0,NULL,'65 kJ/mol',20.0,NULL,'+20 J/(mol K)',NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,'tester','2026-12-04 22:45:47.329772',NULL,'draft',NULL,NULL);
INSERT INTO "measurement" VALUES(11,11,11,NULL,'lineshape',5,'toluene-d8',NULL,NULL,290.0,'290 K',310.0,'310 K',NULL,NULL,NULL,NULL,NULL,60.0,NULL,'60 kJ/mol',NULL,NULL,NULL,60.0,NULL,'60 kJ/mol',NULL,NULL,NULL,NULL,NULL,'tester','2026-12-04 22:45:47.350648',NULL,'draft',NULL,NULL);
INSERT INTO "measurement" VALUES(12,12,12,NULL,'lineshape',5,'toluene-d8',NULL,NULL,NULL,NULL,NULL,NULL,71.128,NULL,'17.0 kcal/mol',300.0,'300 K',58.576,NULL,'14 kcal/mol',-20.92,NULL,'-5 e.u.',NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,'tester','2026-12-04 22:45:47.366743',NULL,'draft',NULL,NULL);
INSERT INTO "measurement" VALUES(13,13,13,NULL,'lineshape',5,'toluene-d8',NULL,NULL,303.15,'30 °C',2.53149999999999977253e+02,'-20 °C',NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,'tester','2026-12-04 22:45:47.382375',NULL,'draft',NULL,NULL);
INSERT INTO "measurement" VALUES(14,14,14,NULL,'lineshape',3,'DMSO-d6',NULL,NULL,273.15,'0 °C',353.15,'80 °C',NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,'tester','2026-12-04 22:45:47.392829',NULL,'draft',NULL,NULL);
INSERT INTO "measurement" VALUES(15,15,15,NULL,'lineshape',5,'toluene-d8',NULL,NULL,NULL,NULL,NULL,NULL,14.644,NULL,'3.5 kcal/mol',150.0,'150 K',NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,'tester','2026-12-04 22:45:47.402868',NULL,'draft',NULL,NULL);
INSERT INTO "measurement" VALUES(16,16,16,NULL,'lineshape',5,'toluene-d8',NULL,NULL,0.0,'0 K',300.0,'300 K',60.0,NULL,'60 kJ/mol',300.0,'300 K',NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,'tester','2026-12-04 22:45:47.413199',NULL,'draft',NULL,NULL);
INSERT INTO "measurement" VALUES(17,17,17,NULL,'lineshape',5,'toluene-d8',NULL,NULL,NULL,NULL,NULL,NULL,60.0,NULL,'60 kJ/mol',300.0,'300 K',NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,'tester','2026-12-04 22:45:47.458734',NULL,'draft',NULL,NULL);
INSERT INTO "measurement" VALUES(18,18,18,NULL,'lineshape',1,'CDCl3',NULL,NULL,NULL,NULL,NULL,NULL,60.0,NULL,'60 kJ/mol',300.0,'300 K',NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,'tester','2026-12-04 22:45:47.474336',NULL,'draft',NULL,NULL);
INSERT INTO "measurement" VALUES(19,18,18,NULL,'lineshape',1,'chloroform-d',NULL,NULL,NULL,NULL,NULL,NULL,65.0,NULL,'65 kJ/mol',305.0,'305 K',NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,'tester','2026-12-04 22:45:47.482219',NULL,'draft',NULL,NULL);
INSERT INTO "measurement" VALUES(20,18,18,NULL,'lineshape',1,'CDCl3',NULL,NULL,NULL,NULL,NULL,NULL,65.0,NULL,'65 kJ/mol',300.0,'300 K',NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,'tester','2026-12-04 22:45:47.493777',NULL,'draft',NULL,NULL);
INSERT INTO "measurement" VALUES(21,18,18,NULL,'lineshape',1,'CDCl3',NULL,NULL,NULL,NULL,NULL,NULL,59.5,2.0,'59.5 ± 2 kJ/mol',301.0,'301 K',NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,'tester','2026-12-04 22:45:47.505279',NULL,'draft',NULL,NULL);
INSERT INTO "measurement" VALUES(22,19,19,NULL,'equilibration',3,'DMSO-d6',NULL,NULL,NULL,NULL,NULL,NULL,110.0,NULL,'110 kJ/mol',350.0,'350 K',NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,'tester','2026-12-04 22:45:47.517031',NULL,'draft',NULL,NULL);
INSERT INTO "measurement" VALUES(23,20,20,NULL,'lineshape',5,'toluene-d8',NULL,NULL,NULL,NULL,NULL,NULL,5.0,NULL,'5 kJ/mol',300.0,'300 K',NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,'tester','2026-12-04 22:45:47.524904',NULL,'retracted',NULL,NULL);
INSERT INTO "measurement" VALUES(24,21,21,NULL,'coalescence',5,'toluene-d8',400.0,'400 MHz',NULL,NULL,NULL,NULL,61.74,NULL,'61.74 kJ/mol',300.0,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,'tester','2026-12-04 22:45:47.565584',NULL,'draft',NULL,NULL);
INSERT INTO "measurement" VALUES(25,22,22,NULL,'coalescence',5,'toluene-d8',400.0,'400 MHz',NULL,NULL,NULL,NULL,2.58320160000000043965e+02,NULL,'14.76',300.15,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,'tester','2026-12-04 22:45:47.576133',NULL,'draft',NULL,NULL);
INSERT INTO "measurement" VALUES(26,23,23,NULL,'coalescence',5,'toluene-d8',400.0,'400 MHz',220.0,'220 K',280.0,'280 K',55.0,0.5,'55.0 ± 0.5 kJ/mol',250.0,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,'tester','2026-12-04 22:45:47.591673',NULL,'draft',NULL,NULL);
INSERT INTO "measurement" VALUES(27,24,24,NULL,'coalescence',5,'toluene-d8',400.0,'400 MHz',NULL,NULL,NULL,NULL,70.0,NULL,'70 kJ/mol',298.0,'298 K',NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,'tester','2026-12-04 22:45:47.610371',NULL,'draft',NULL,NULL);
INSERT INTO "measurement" VALUES(28,25,25,NULL,'coalescence',1,'CDCl3',400.0,'400 MHz',NULL,NULL,NULL,NULL,69.036,NULL,'16.5 kcal/mol',343.15,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,'tester','2026-12-04 22:45:47.628672',NULL,'draft',NULL,NULL);
INSERT INTO "measurement" VALUES(29,26,26,NULL,'coalescence',5,'toluene-d8',400.0,'400 MHz',250.0,'250 K',320.0,'320 K',67.0,NULL,'67 kJ/mol',330.0,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,'tester','2026-12-04 22:45:47.650839',NULL,'draft',NULL,NULL);
INSERT INTO "measurement" VALUES(30,27,27,NULL,'coalescence',5,'toluene-d8',400.0,'400 MHz',NULL,NULL,NULL,NULL,50.0,NULL,'50 kJ/mol',300.0,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,'tester','2026-12-04 22:45:47.676101',NULL,'draft',NULL,NULL);
INSERT INTO "measurement" VALUES(31,28,28,NULL,'coalescence',5,'toluene-d8',400.0,'400 MHz',NULL,NULL,NULL,NULL,60.0,NULL,'60 kJ/mol',300.0,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,'tester','2026-12-04 22:45:47.688142',NULL,'draft',NULL,NULL);
INSERT INTO "measurement" VALUES(32,29,29,NULL,'coalescence',5,'toluene-d8',0.04,'40 kHz',NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,'tester','2026-12-04 22:45:47.705946',NULL,'draft',NULL,NULL);
INSERT INTO "measurement" VALUES(33,30,30,NULL,'lineshape',5,'toluene-d8',NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,65.0,NULL,'65 kJ/mol',20.0,NULL,'+20 J/(mol K)',NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,'tester','2026-12-04 22:45:47.717056',NULL,'draft',NULL,NULL);
INSERT INTO "measurement" VALUES(34,31,31,NULL,'lineshape',5,'toluene-d8',NULL,NULL,290.0,'290 K',310.0,'310 K',NULL,NULL,NULL,NULL,NULL,60.0,NULL,'60 kJ/mol',NULL,NULL,NULL,60.0,NULL,'60 kJ/mol',NULL,NULL,NULL,NULL,NULL,'tester','2026-12-04 22:45:47.738841',NULL,'draft',NULL,NULL);
INSERT INTO "measurement" VALUES(35,32,32,NULL,'lineshape',5,'toluene-d8',NULL,NULL,NULL,NULL,NULL,NULL,71.128,NULL,'17.0 kcal/mol',300.0,'300 K',58.576,NULL,'14 kcal/mol',-20.92,NULL,'-5 e.u.',NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,'tester','2026-12-04 22:45:47.749771',NULL,'draft',NULL,NULL);
INSERT INTO "measurement" VALUES(36,33,33,NULL,'lineshape',5,'toluene-d8',NULL,NULL,303.15,'30 °C',2.53149999999999977253e+02,'-20 °C',NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,'tester','2026-12-04 22:45:47.766121',NULL,'draft',NULL,NULL);
INSERT INTO "measurement" VALUES(37,34,34,NULL,'lineshape',3,'DMSO-d6',NULL,NULL,273.15,'0 °C',353.15,'80 °C',NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,'tester','2026-12-04 22:45:47.777319',NULL,'draft',NULL,NULL);
INSERT INTO "measurement" VALUES(38,35,35,NULL,'lineshape',5,'toluene-d8',NULL,NULL,NULL,NULL,NULL,NULL,14.644,NULL,'3.5 kcal/mol',150.0,'150 K',NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,'tester','2026-12-04 22:45:47.793368',NULL,'draft',NULL,NULL);
INSERT INTO "measurement" VALUES(39,36,36,NULL,'lineshape',5,'toluene-d8',NULL,NULL,0.0,'0 K',300.0,'300 K',60.0,NULL,'60 kJ/mol',300.0,'300 K',NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,'tester','2026-12-04 22:45:47.808490',NULL,'draft',NULL,NULL);
INSERT INTO "measurement" VALUES(40,37,37,NULL,'lineshape',5,'toluene-d8',NULL,NULL,NULL,NULL,NULL,NULL,60.0,NULL,'60 kJ/mol',300.0,'300 K',NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,'tester','2026-12-04 22:45:47.822779',NULL,'draft',NULL,NULL);
INSERT INTO "measurement" VALUES(41,38,38,NULL,'lineshape',1,'CDCl3',NULL,NULL,NULL,NULL,NULL,NULL,60.0,NULL,'60 kJ/mol',300.0,'300 K',NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,'tester','2026-12-04 22:45:47.838424',NULL,'draft',NULL,NULL);
INSERT INTO "measurement" VALUES(42,38,38,NULL,'lineshape',1,'chloroform-d',NULL,NULL,NULL,NULL,NULL,NULL,65.0,NULL,'65 kJ/mol',305.0,'305 K',NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,'tester','2026-12-04 22:45:47.847204',NULL,'draft',NULL,NULL);
INSERT INTO "measurement" VALUES(43,38,38,NULL,'lineshape',1,'CDCl3',NULL,NULL,NULL,NULL,NULL,NULL,65.0,NULL,'65 kJ/mol',300.0,'300 K',NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,'tester','2026-12-04 22:45:47.870342',NULL,'draft',NULL,NULL);
INSERT INTO "measurement" VALUES(44,38,38,NULL,'lineshape',1,'CDCl3',NULL,NULL,NULL,NULL,NULL,NULL,59.5,2.0,'59.5 ± 2 kJ/mol',301.0,'301 K',NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,'tester','2026-12-04 22:45:47.888968',NULL,'draft',NULL,NULL);
INSERT INTO "measurement" VALUES(45,39,39,NULL,'equilibration',3,'DMSO-d6',NULL,NULL,NULL,NULL,NULL,NULL,110.0,NULL,'110 kJ/mol',350.0,'350 K',NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,'tester','2026-12-04 22:45:47.907669',NULL,'draft',NULL,NULL);
INSERT INTO "measurement" VALUES(46,40,40,NULL,'lineshape',5,'toluene-d8',NULL,NULL,NULL,NULL,NULL,NULL,5.0,NULL,'5 kJ/mol',300.0,'300 K',NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,NULL,'tester','2026-12-04 22:45:47.919021',NULL,'retracted',NULL,NULL);
CREATE TABLE motif (
	id INTEGER NOT NULL, 
	name VARCHAR(64) NOT NULL, 
	smarts TEXT NOT NULL, 
	description TEXT NOT NULL, 
	created_by VARCHAR(128) NOT NULL, 
	created_at DATETIME NOT NULL, 
	CONSTRAINT pk_motif PRIMARY KEY (id), 
	CONSTRAINT uq_motif_name UNIQUE (name)
);
CREATE TABLE process (
	id INTEGER NOT NULL, 
	compound_id INTEGER NOT NULL, 
	kind VARCHAR(64) NOT NULL, 
	sites TEXT NOT NULL, 
	nucleus VARCHAR(16) NOT NULL, 
	description TEXT, 
	CONSTRAINT pk_process PRIMARY KEY (id), 
	CONSTRAINT fk_process_compound_id_compound FOREIGN KEY(compound_id) REFERENCES compound (id), 
	CONSTRAINT fk_process_kind_process_kind FOREIGN KEY(kind) REFERENCES process_kind (name), 
	CONSTRAINT uq_process_compound_id_kind_sites_nucleus UNIQUE (compound_id, kind, sites, nucleus)
);
INSERT INTO "process" VALUES(1,1,'bond-rotation','','1H',NULL);
INSERT INTO "process" VALUES(2,2,'bond-rotation','','1H',NULL);
INSERT INTO "process" VALUES(3,3,'bond-rotation','','1H',NULL);
INSERT INTO "process" VALUES(4,4,'bond-rotation','','1H',NULL);
INSERT INTO "process" VALUES(5,5,'bond-rotation','','1H',NULL);
INSERT INTO "process" VALUES(6,6,'bond-rotation','','1H',NULL);
INSERT INTO "process" VALUES(7,7,'bond-rotation','','1H',NULL);
INSERT INTO "process" VALUES(8,8,'bond-rotation','','13C',NULL);
INSERT INTO "process" VALUES(9,9,'bond-rotation','','1H',NULL);
INSERT INTO "process" VALUES(10,10,'ring-inversion','','1H',NULL);
INSERT INTO "process" VALUES(11,11,'ring-inversion','','1H',NULL);
INSERT INTO "process" VALUES(12,12,'ring-inversion','','1H',NULL);
INSERT INTO "process" VALUES(13,13,'ring-inversion','','1H',NULL);
INSERT INTO "process" VALUES(14,14,'ring-inversion','','1H',NULL);
INSERT INTO "process" VALUES(15,15,'ring-inversion','','1H',NULL);
INSERT INTO "process" VALUES(16,16,'ring-inversion','','1H',NULL);
INSERT INTO "process" VALUES(17,17,'ring-inversion','','1H',NULL);
INSERT INTO "process" VALUES(18,18,'ring-inversion','','1H',NULL);
INSERT INTO "process" VALUES(19,19,'bond-rotation','','',NULL);
INSERT INTO "process" VALUES(20,20,'ring-inversion','','1H',NULL);
INSERT INTO "process" VALUES(21,21,'bond-rotation','','1H',NULL);
INSERT INTO "process" VALUES(22,22,'bond-rotation','','1H',NULL);
INSERT INTO "process" VALUES(23,23,'bond-rotation','','1H',NULL);
INSERT INTO "process" VALUES(24,24,'bond-rotation','','1H',NULL);
INSERT INTO "process" VALUES(25,25,'bond-rotation','','1H',NULL);
INSERT INTO "process" VALUES(26,26,'bond-rotation','','1H',NULL);
INSERT INTO "process" VALUES(27,27,'bond-rotation','','1H',NULL);
INSERT INTO "process" VALUES(28,28,'bond-rotation','','13C',NULL);
INSERT INTO "process" VALUES(29,29,'bond-rotation','','1H',NULL);
INSERT INTO "process" VALUES(30,30,'ring-inversion','','1H',NULL);
INSERT INTO "process" VALUES(31,31,'ring-inversion','','1H',NULL);
INSERT INTO "process" VALUES(32,32,'ring-inversion','','1H',NULL);
INSERT INTO "process" VALUES(33,33,'ring-inversion','','1H',NULL);
INSERT INTO "process" VALUES(34,34,'ring-inversion','','1H',NULL);
INSERT INTO "process" VALUES(35,35,'ring-inversion','','1H',NULL);
INSERT INTO "process" VALUES(36,36,'ring-inversion','','1H',NULL);
INSERT INTO "process" VALUES(37,37,'ring-inversion','','1H',NULL);
INSERT INTO "process" VALUES(38,38,'ring-inversion','','1H',NULL);
INSERT INTO "process" VALUES(39,39,'bond-rotation','','',NULL);
INSERT INTO "process" VALUES(40,40,'ring-inversion','','1H',NULL);
CREATE TABLE process_kind (
	name VARCHAR(64) NOT NULL, 
	description TEXT NOT NULL, 
	CONSTRAINT pk_process_kind PRIMARY KEY (name)
);
INSERT INTO "process_kind" VALUES('bond-rotation','hindered rotation about a single or partial double bond (amide C–N, biaryl axis …)');
INSERT INTO "process_kind" VALUES('ring-inversion','ring flip / ring inversion of a cyclic framework');
INSERT INTO "process_kind" VALUES('sigmatropic-shift','a [1,j] or [i,j] sigmatropic migration');
INSERT INTO "process_kind" VALUES('degenerate-rearrangement','a rearrangement whose product is the starting structure (Cope-type …)');
INSERT INTO "process_kind" VALUES('haptotropic-shift','a metal fragment moving between ring positions or hapticities');
INSERT INTO "process_kind" VALUES('pyramidal-inversion','inversion at a pyramidal N, P, S or As centre');
INSERT INTO "process_kind" VALUES('pseudorotation','Berry or turnstile pseudorotation at a five-coordinate centre');
INSERT INTO "process_kind" VALUES('ligand-exchange','exchange of ligands between sites or with free ligand');
INSERT INTO "process_kind" VALUES('other','anything not covered above (describe it in the process notes)');
CREATE TABLE rate_point (
	id INTEGER NOT NULL, 
	measurement_id INTEGER NOT NULL, 
	t_k FLOAT NOT NULL, 
	t_err_k FLOAT, 
	t_text TEXT NOT NULL, 
	k_per_s FLOAT NOT NULL, 
	k_err_per_s FLOAT, 
	k_text TEXT NOT NULL, 
	CONSTRAINT pk_rate_point PRIMARY KEY (id), 
	CONSTRAINT fk_rate_point_measurement_id_measurement FOREIGN KEY(measurement_id) REFERENCES measurement (id)
);
INSERT INTO "rate_point" VALUES(1,10,280.0,NULL,'280 K',96.2662,4.81331,'96.2662 s-1');
INSERT INTO "rate_point" VALUES(2,10,295.0,NULL,'295 K',337.164,16.8582,'337.164 s-1');
INSERT INTO "rate_point" VALUES(3,10,310.0,NULL,'310 K',1048.57,52.4285,'1048.57 s-1');
INSERT INTO "rate_point" VALUES(4,10,325.0,NULL,'325 K',2943.33,147.1665,'2943.33 s-1');
INSERT INTO "rate_point" VALUES(5,10,340.0,NULL,'340 K',7558.12,377.906,'7558.12 s-1');
INSERT INTO "rate_point" VALUES(6,1,300.0,NULL,'300 K',111.0,NULL,'111 s-1');
INSERT INTO "rate_point" VALUES(7,1,-5.0,NULL,'-5 K',2.0,NULL,'2 s-1');
INSERT INTO "rate_point" VALUES(8,33,280.0,NULL,'280 K',96.2662,4.81331,'96.2662 s-1');
INSERT INTO "rate_point" VALUES(9,33,295.0,NULL,'295 K',337.164,16.8582,'337.164 s-1');
INSERT INTO "rate_point" VALUES(10,33,310.0,NULL,'310 K',1048.57,52.4285,'1048.57 s-1');
INSERT INTO "rate_point" VALUES(11,33,325.0,NULL,'325 K',2943.33,147.1665,'2943.33 s-1');
INSERT INTO "rate_point" VALUES(12,33,340.0,NULL,'340 K',7558.12,377.906,'7558.12 s-1');
INSERT INTO "rate_point" VALUES(13,24,300.0,NULL,'300 K',111.0,NULL,'111 s-1');
INSERT INTO "rate_point" VALUES(14,24,-5.0,NULL,'-5 K',2.0,NULL,'2 s-1');
CREATE TABLE revision (
	id INTEGER NOT NULL, 
	entity VARCHAR(32) NOT NULL, 
	entity_id INTEGER NOT NULL, 
	action VARCHAR(32) NOT NULL, 
	actor VARCHAR(128) NOT NULL, 
	at DATETIME NOT NULL, 
	before_json TEXT, 
	after_json TEXT, 
	reason TEXT, 
	batch_id INTEGER, 
	prev_hash VARCHAR(64) NOT NULL, 
	hash VARCHAR(64) NOT NULL, 
	CONSTRAINT pk_revision PRIMARY KEY (id), 
	CONSTRAINT fk_revision_batch_id_import_batch FOREIGN KEY(batch_id) REFERENCES import_batch (id), 
	CONSTRAINT uq_revision_hash UNIQUE (hash)
);
INSERT INTO "revision" VALUES(1,'measurement',1,'add','tester','2026-12-04 22:45:47.102260',NULL,'{"coalescence":{"dnu_hz":50.0,"dnu_text":"50 Hz","field_mhz":400.0,"field_text":"400 MHz","tc_k":300.0,"tc_text":"300 K"},"compound":{"label":"A-GH"},"dg_kj_mol":61.74,"dg_t_k":300.0,"dg_text":"61.74 kJ/mol","field_mhz":400.0,"field_text":"400 MHz","method":"coalescence","process":{"kind":"bond-rotation","nucleus":"1H","sites":""},"solvent_text":"toluene-d8","status":"draft"}',NULL,NULL,'0000000000000000000000000000000000000000000000000000000000000000','16e160c99e0e8678ff15598d1cf01da4d006c82d807ee936a98559e72dd1075a');
INSERT INTO "revision" VALUES(2,'measurement',2,'add','tester','2026-12-04 22:45:47.134580',NULL,'{"coalescence":{"dnu_hz":50.0,"dnu_text":"50 Hz","field_mhz":400.0,"field_text":"400 MHz","tc_k":300.15,"tc_text":"27 °C"},"compound":{"label":"A-KCAL"},"dg_kj_mol":258.32016000000004,"dg_t_k":300.15,"dg_text":"61.74 kcal/mol","field_mhz":400.0,"field_text":"400 MHz","method":"coalescence","process":{"kind":"bond-rotation","nucleus":"1H","sites":""},"solvent_text":"toluene-d8","status":"draft"}',NULL,NULL,'16e160c99e0e8678ff15598d1cf01da4d006c82d807ee936a98559e72dd1075a','649219b9d1b324364873147c9f7be8c370530b9c4e5d25f077e3ea59a3d47929');
INSERT INTO "revision" VALUES(3,'measurement',3,'add','tester','2026-12-04 22:45:47.153377',NULL,'{"coalescence":{"dnu_err_hz":1.0,"dnu_hz":12.0,"dnu_text":"12 ± 1 Hz","field_mhz":400.0,"field_text":"400 MHz","j_hz":14.0,"j_text":"14 Hz","tc_err_k":2.0,"tc_k":250.0,"tc_text":"250 ± 2 K"},"compound":{"label":"A-AB"},"dg_err_kj_mol":0.5,"dg_kj_mol":55.0,"dg_t_k":250.0,"dg_text":"55.0 ± 0.5 kJ/mol","field_mhz":400.0,"field_text":"400 MHz","method":"coalescence","process":{"kind":"bond-rotation","nucleus":"1H","sites":""},"solvent_text":"toluene-d8","status":"draft","t_max_k":280.0,"t_max_text":"280 K","t_min_k":220.0,"t_min_text":"220 K"}',NULL,NULL,'649219b9d1b324364873147c9f7be8c370530b9c4e5d25f077e3ea59a3d47929','7ba1aa01d040afed39010ea8911a61525c68126c45767e813b8cdee44a93cc39');
INSERT INTO "revision" VALUES(4,'measurement',4,'add','tester','2026-12-04 22:45:47.169219',NULL,'{"coalescence":{"dnu_hz":80.0,"dnu_text":"80 Hz","field_mhz":400.0,"field_text":"400 MHz","population_ratio":2.5,"population_text":"2.5","tc_k":320.0,"tc_text":"320 K"},"compound":{"label":"A-POP"},"dg_kj_mol":70.0,"dg_t_k":298.0,"dg_t_text":"298 K","dg_text":"70 kJ/mol","field_mhz":400.0,"field_text":"400 MHz","method":"coalescence","process":{"kind":"bond-rotation","nucleus":"1H","sites":""},"solvent_text":"toluene-d8","status":"draft"}',NULL,NULL,'7ba1aa01d040afed39010ea8911a61525c68126c45767e813b8cdee44a93cc39','7b9f398db58a4b9adb4aeb469ce83573d9e0fc82af66ed26702d5064b7bbe894');
INSERT INTO "revision" VALUES(5,'measurement',5,'add','tester','2026-12-04 22:45:47.260117',NULL,'{"coalescence":{"dnu_hz":40.0,"dnu_text":"40 Hz","field_mhz":400.0,"field_text":"400 MHz","tc_k":343.15,"tc_text":"70 °C"},"compound":{"label":"A-HOT"},"dg_kj_mol":69.036,"dg_t_k":343.15,"dg_text":"16.5 kcal/mol","field_mhz":400.0,"field_text":"400 MHz","method":"coalescence","process":{"kind":"bond-rotation","nucleus":"1H","sites":""},"solvent_text":"CDCl3","status":"draft"}',NULL,NULL,'7b9f398db58a4b9adb4aeb469ce83573d9e0fc82af66ed26702d5064b7bbe894','9313d6e107ffb5b27fc30ef3fba5bd1c485a35dbad751351538821aa45de21e6');
INSERT INTO "revision" VALUES(6,'measurement',6,'add','tester','2026-12-04 22:45:47.276791',NULL,'{"coalescence":{"dnu_hz":40.0,"dnu_text":"40 Hz","field_mhz":400.0,"field_text":"400 MHz","tc_k":330.0,"tc_text":"330 K"},"compound":{"label":"A-RANGE"},"dg_kj_mol":67.0,"dg_t_k":330.0,"dg_text":"67 kJ/mol","field_mhz":400.0,"field_text":"400 MHz","method":"coalescence","process":{"kind":"bond-rotation","nucleus":"1H","sites":""},"solvent_text":"toluene-d8","status":"draft","t_max_k":320.0,"t_max_text":"320 K","t_min_k":250.0,"t_min_text":"250 K"}',NULL,NULL,'9313d6e107ffb5b27fc30ef3fba5bd1c485a35dbad751351538821aa45de21e6','14abf428ee655f267532f9bd1f715a781bede281d83d59196f65e457ad3661e1');
INSERT INTO "revision" VALUES(7,'measurement',7,'add','tester','2026-12-04 22:45:47.291084',NULL,'{"coalescence":{"dnu_hz":8000.0,"dnu_text":"8000 Hz","field_mhz":400.0,"field_text":"400 MHz","tc_k":300.0,"tc_text":"300 K"},"compound":{"label":"A-WIDE"},"dg_kj_mol":50.0,"dg_t_k":300.0,"dg_text":"50 kJ/mol","field_mhz":400.0,"field_text":"400 MHz","method":"coalescence","process":{"kind":"bond-rotation","nucleus":"1H","sites":""},"solvent_text":"toluene-d8","status":"draft"}',NULL,NULL,'14abf428ee655f267532f9bd1f715a781bede281d83d59196f65e457ad3661e1','b3114f3ad519f05120ef7f2c72a2e1d953445726f9eb00e4da008d4a5b7393a9');
INSERT INTO "revision" VALUES(8,'measurement',8,'add','tester','2026-12-04 22:45:47.302703',NULL,'{"coalescence":{"dnu_hz":150.87012000000001,"dnu_text":"1.5 ppm","field_mhz":400.0,"field_text":"400 MHz","tc_k":300.0,"tc_text":"300 K"},"compound":{"label":"A-C13"},"dg_kj_mol":60.0,"dg_t_k":300.0,"dg_text":"60 kJ/mol","field_mhz":400.0,"field_text":"400 MHz","method":"coalescence","process":{"kind":"bond-rotation","nucleus":"13C","sites":""},"solvent_text":"toluene-d8","status":"draft"}',NULL,NULL,'b3114f3ad519f05120ef7f2c72a2e1d953445726f9eb00e4da008d4a5b7393a9','969c68dcd45f7d81b53fcb3afd9803002a6d176c70c76d8d4c333c3e56bfe2fd');
INSERT INTO "revision" VALUES(9,'measurement',9,'add','tester','2026-12-04 22:45:47.318092',NULL,'{"coalescence":{"dnu_hz":20.0,"dnu_text":"20 Hz","field_mhz":0.04,"field_text":"40 kHz","tc_k":300.0,"tc_text":"300 K"},"compound":{"label":"A-KHZ"},"field_mhz":0.04,"field_text":"40 kHz","method":"coalescence","process":{"kind":"bond-rotation","nucleus":"1H","sites":""},"solvent_text":"toluene-d8","status":"draft"}',NULL,NULL,'969c68dcd45f7d81b53fcb3afd9803002a6d176c70c76d8d4c333c3e56bfe2fd','68b420877eb85e6e3090c6ef81c1a077d7fe32aa227ebe3a83177f335bd5191c');
INSERT INTO "revision" VALUES(10,'measurement',10,'add','tester','2026-12-04 22:45:47.330001',NULL,'{"compound":{"label":"A-REFIT"},"dh_kj_mol":65.0,"dh_text":"65 kJ/mol","ds_j_mol_k":20.0,"ds_text":"+20 J/(mol K)","method":"lineshape","process":{"kind":"ring-inversion","nucleus":"1H","sites":""},"rates":[["280 K","96.2662 s-1"],["295 K","337.164 s-1"],["310 K","1048.57 s-1"],["325 K","2943.33 s-1"],["340 K","7558.12 s-1"]],"solvent_text":"toluene-d8","status":"draft"}',NULL,NULL,'68b420877eb85e6e3090c6ef81c1a077d7fe32aa227ebe3a83177f335bd5191c','a41cb8cb278dfa1e5a4f7e100beb454bf16a290a2a4eaaf72b4a487d700d4262');
INSERT INTO "revision" VALUES(11,'measurement',11,'add','tester','2026-12-04 22:45:47.350821',NULL,'{"compound":{"label":"A-EA"},"dh_kj_mol":60.0,"dh_text":"60 kJ/mol","ea_kj_mol":60.0,"ea_text":"60 kJ/mol","method":"lineshape","process":{"kind":"ring-inversion","nucleus":"1H","sites":""},"solvent_text":"toluene-d8","status":"draft","t_max_k":310.0,"t_max_text":"310 K","t_min_k":290.0,"t_min_text":"290 K"}',NULL,NULL,'a41cb8cb278dfa1e5a4f7e100beb454bf16a290a2a4eaaf72b4a487d700d4262','87d2d3a4987d15761321923b7498cf5f44ec467f074c7b3b051f180628aa1115');
INSERT INTO "revision" VALUES(12,'measurement',12,'add','tester','2026-12-04 22:45:47.367374',NULL,'{"compound":{"label":"A-EU"},"dg_kj_mol":71.128,"dg_t_k":300.0,"dg_t_text":"300 K","dg_text":"17.0 kcal/mol","dh_kj_mol":58.576,"dh_text":"14 kcal/mol","ds_j_mol_k":-20.92,"ds_text":"-5 e.u.","method":"lineshape","process":{"kind":"ring-inversion","nucleus":"1H","sites":""},"solvent_text":"toluene-d8","status":"draft"}',NULL,NULL,'87d2d3a4987d15761321923b7498cf5f44ec467f074c7b3b051f180628aa1115','08a04ce92ad5ad19338b1ae99f771df24406d604436b29d1400a09f7cdc2892e');
INSERT INTO "revision" VALUES(13,'measurement',13,'add','tester','2026-12-04 22:45:47.382545',NULL,'{"compound":{"label":"A-SWAP"},"method":"lineshape","process":{"kind":"ring-inversion","nucleus":"1H","sites":""},"solvent_text":"toluene-d8","status":"draft","t_max_k":253.14999999999998,"t_max_text":"-20 °C","t_min_k":303.15,"t_min_text":"30 °C"}',NULL,NULL,'08a04ce92ad5ad19338b1ae99f771df24406d604436b29d1400a09f7cdc2892e','303c075adaf28cb5e578f9b79942af3c92b08bccee900b1acbf228845a05a1a1');
INSERT INTO "revision" VALUES(14,'measurement',14,'add','tester','2026-12-04 22:45:47.392984',NULL,'{"compound":{"label":"A-COLD"},"method":"lineshape","process":{"kind":"ring-inversion","nucleus":"1H","sites":""},"solvent_text":"DMSO-d6","status":"draft","t_max_k":353.15,"t_max_text":"80 °C","t_min_k":273.15,"t_min_text":"0 °C"}',NULL,NULL,'303c075adaf28cb5e578f9b79942af3c92b08bccee900b1acbf228845a05a1a1','99a992b4a2675b411b7aee3f502ba20a9e6a0fc62ca0d074c77d036e4d18aa0e');
INSERT INTO "revision" VALUES(15,'measurement',15,'add','tester','2026-12-04 22:45:47.403019',NULL,'{"compound":{"label":"A-LOW"},"dg_kj_mol":14.644,"dg_t_k":150.0,"dg_t_text":"150 K","dg_text":"3.5 kcal/mol","method":"lineshape","process":{"kind":"ring-inversion","nucleus":"1H","sites":""},"solvent_text":"toluene-d8","status":"draft"}',NULL,NULL,'99a992b4a2675b411b7aee3f502ba20a9e6a0fc62ca0d074c77d036e4d18aa0e','17ed0390a4415300c9a563d028e54190ab72ef048d36ede3f94b813e293e9c33');
INSERT INTO "revision" VALUES(16,'measurement',16,'add','tester','2026-12-04 22:45:47.413447',NULL,'{"compound":{"label":"A-ZERO"},"dg_kj_mol":60.0,"dg_t_k":300.0,"dg_t_text":"300 K","dg_text":"60 kJ/mol","method":"lineshape","process":{"kind":"ring-inversion","nucleus":"1H","sites":""},"solvent_text":"toluene-d8","status":"draft","t_max_k":300.0,"t_max_text":"300 K","t_min_k":0.0,"t_min_text":"0 K"}',NULL,NULL,'17ed0390a4415300c9a563d028e54190ab72ef048d36ede3f94b813e293e9c33','bd0742dc770d5c7c450cba60358168f4c116a5c81d8477caf9b016dfe12e06ee');
INSERT INTO "revision" VALUES(17,'measurement',17,'add','tester','2026-12-04 22:45:47.459135',NULL,'{"compound":{"label":"A-BAD","smiles_input":"C(C)(C)(C)(C)COO"},"dg_kj_mol":60.0,"dg_t_k":300.0,"dg_t_text":"300 K","dg_text":"60 kJ/mol","method":"lineshape","process":{"kind":"ring-inversion","nucleus":"1H","sites":""},"solvent_text":"toluene-d8","status":"draft"}',NULL,NULL,'bd0742dc770d5c7c450cba60358168f4c116a5c81d8477caf9b016dfe12e06ee','092d89bec98d63246c8e215c810524b482b3af00986417ed392860a1f5d5799c');
INSERT INTO "revision" VALUES(18,'measurement',18,'add','tester','2026-12-04 22:45:47.474491',NULL,'{"compound":{"label":"A-DUP"},"dg_kj_mol":60.0,"dg_t_k":300.0,"dg_t_text":"300 K","dg_text":"60 kJ/mol","method":"lineshape","process":{"kind":"ring-inversion","nucleus":"1H","sites":""},"solvent_text":"CDCl3","status":"draft"}',NULL,NULL,'092d89bec98d63246c8e215c810524b482b3af00986417ed392860a1f5d5799c','cdcdba31446cfe3e3eb760f0555dba94d67f1871a20e25d295e8e55d816fcac6');
INSERT INTO "revision" VALUES(19,'measurement',19,'add','tester','2026-12-04 22:45:47.482332',NULL,'{"compound":{"label":"A-DUP"},"dg_kj_mol":65.0,"dg_t_k":305.0,"dg_t_text":"305 K","dg_text":"65 kJ/mol","method":"lineshape","process":{"kind":"ring-inversion","nucleus":"1H","sites":""},"solvent_text":"chloroform-d","status":"draft"}',NULL,NULL,'cdcdba31446cfe3e3eb760f0555dba94d67f1871a20e25d295e8e55d816fcac6','a908de60597a8d555145d2adf0130eea86526eefbb450f98384579f5c4f23fa1');
INSERT INTO "revision" VALUES(20,'measurement',20,'add','tester','2026-12-04 22:45:47.493890',NULL,'{"compound":{"label":"A-DUP"},"dg_kj_mol":65.0,"dg_t_k":300.0,"dg_t_text":"300 K","dg_text":"65 kJ/mol","method":"lineshape","process":{"kind":"ring-inversion","nucleus":"1H","sites":""},"solvent_text":"CDCl3","status":"draft"}',NULL,NULL,'a908de60597a8d555145d2adf0130eea86526eefbb450f98384579f5c4f23fa1','0b2d87e8fb17af42e36799152e7a58566113c8d3b88dae08cf3a8c753228a88f');
INSERT INTO "revision" VALUES(21,'measurement',21,'add','tester','2026-12-04 22:45:47.505398',NULL,'{"compound":{"label":"A-DUP"},"dg_err_kj_mol":2.0,"dg_kj_mol":59.5,"dg_t_k":301.0,"dg_t_text":"301 K","dg_text":"59.5 ± 2 kJ/mol","method":"lineshape","process":{"kind":"ring-inversion","nucleus":"1H","sites":""},"solvent_text":"CDCl3","status":"draft"}',NULL,NULL,'0b2d87e8fb17af42e36799152e7a58566113c8d3b88dae08cf3a8c753228a88f','e4e13f860d2ca58bfc693ce7b2cd90054a1e3b5901fca98c1a121afa43cabd3f');
INSERT INTO "revision" VALUES(22,'measurement',22,'add','tester','2026-12-04 22:45:47.517288',NULL,'{"compound":{"label":"A-SLOW"},"dg_kj_mol":110.0,"dg_t_k":350.0,"dg_t_text":"350 K","dg_text":"110 kJ/mol","method":"equilibration","process":{"kind":"bond-rotation","nucleus":"","sites":""},"solvent_text":"DMSO-d6","status":"draft"}',NULL,NULL,'e4e13f860d2ca58bfc693ce7b2cd90054a1e3b5901fca98c1a121afa43cabd3f','021301dd68da899d75179014488e42dd04c24abcd3dc9c39a4c266e7e09f192c');
INSERT INTO "revision" VALUES(23,'measurement',23,'add','tester','2026-12-04 22:45:47.525051',NULL,'{"compound":{"label":"A-GONE"},"dg_kj_mol":5.0,"dg_t_k":300.0,"dg_t_text":"300 K","dg_text":"5 kJ/mol","method":"lineshape","process":{"kind":"ring-inversion","nucleus":"1H","sites":""},"solvent_text":"toluene-d8","status":"draft"}',NULL,NULL,'021301dd68da899d75179014488e42dd04c24abcd3dc9c39a4c266e7e09f192c','359df179d728b224c0d538edf6a9aeefce1832e08e57012a22b53136c9f0dd17');
INSERT INTO "revision" VALUES(24,'measurement',2,'accept-finding','curator','2026-12-04 22:45:47.564697','{"accepted_by":null,"finding":12}','{"finding":12,"inputs_hash":"32aecedd9a98c41936ecce6ccc2172afa1f5c5424b82a021e741f29da22ee9df","message":"ΔG‡ 258.32 kJ/mol does not match 61.78 kJ/mol recomputed from Tc 27.0 °C (300.1 K) and Δν 50 Hz (Gutowsky–Holm, k_c = πΔν/√2 = 111.1 s⁻¹): off by +196.54 kJ/mol, tolerance ±1.00 kJ/mol","rule":"coalescence-barrier","rule_version":1,"severity":"error"}','checked by hand',NULL,'359df179d728b224c0d538edf6a9aeefce1832e08e57012a22b53136c9f0dd17','6abc84a0754996601df21197808f447fa2484a120e5b0f6209e626d300173e9c');
INSERT INTO "revision" VALUES(25,'measurement',3,'accept-finding','curator','2026-12-04 22:45:47.564842','{"accepted_by":null,"finding":3}','{"finding":3,"inputs_hash":"59de97fcd9f1e9fa96d26a886e533675400ef76a5935667e2fd2de4cdf94c96b","message":"ΔG‡ 55.00 kJ/mol does not match 51.74 kJ/mol recomputed from Tc 250.0 K and Δν 12 Hz (coupled AB, J = 14 Hz, k_c = π√(Δν²+6J²)/√2 = 80.71 s⁻¹): off by +3.26 kJ/mol, tolerance ±1.66 kJ/mol","rule":"coalescence-barrier","rule_version":1,"severity":"error"}','checked by hand',NULL,'6abc84a0754996601df21197808f447fa2484a120e5b0f6209e626d300173e9c','a29cbe7827418e439314ca2b17a05d292e8a51a84f5a20b6561f3419112ef070');
INSERT INTO "revision" VALUES(26,'measurement',4,'accept-finding','curator','2026-12-04 22:45:47.564951','{"accepted_by":null,"finding":4}','{"finding":4,"inputs_hash":"1ac572a593fbd5cd3171a1e366029bca801e0e73d6a42d44974985467795b99a","message":"ΔG‡ 70.00 kJ/mol does not match 67.46 kJ/mol recomputed from Tc 320.0 K and Δν 80 Hz (unequal populations 2.50:1, Shanan-Atidi–Bar-Eli, leaving the major site, k = 64.91 s⁻¹): off by +2.54 kJ/mol, tolerance ±1.22 kJ/mol (ΔG‡ is quoted at 298.0 K; compared allowing for a small ΔS‡)","rule":"coalescence-barrier","rule_version":1,"severity":"error"}','checked by hand',NULL,'a29cbe7827418e439314ca2b17a05d292e8a51a84f5a20b6561f3419112ef070','c305b0eae29f577aea2252550381a1b022484cdd3cc72e1ffadf090a46061472');
INSERT INTO "revision" VALUES(27,'measurement',5,'accept-finding','curator','2026-12-04 22:45:47.565040','{"accepted_by":null,"finding":5}','{"finding":5,"inputs_hash":"bff4b9eab27ac8a65cfa4521edf0595cea37a933301aed91b2dbde2ae8405360","message":"ΔG‡ 16.50 kcal/mol does not match 17.12 kcal/mol recomputed from Tc 70.0 °C (343.1 K) and Δν 40 Hz (Gutowsky–Holm, k_c = πΔν/√2 = 88.86 s⁻¹): off by -0.62 kcal/mol, tolerance ±0.24 kcal/mol","rule":"coalescence-barrier","rule_version":1,"severity":"error"}','checked by hand',NULL,'c305b0eae29f577aea2252550381a1b022484cdd3cc72e1ffadf090a46061472','65dae24470a9d0c2ec76221ff090d239b2d440e3a1bede5c5bff19cd5576f165');
INSERT INTO "revision" VALUES(28,'measurement',6,'accept-finding','curator','2026-12-04 22:45:47.565141','{"accepted_by":null,"finding":7}','{"finding":7,"inputs_hash":"eb9f901dd3a2ac9314cc863b37d5ce16ca1c4db79d32ecaecffabd8be8d9b388","message":"ΔG‡ 67.00 kJ/mol does not match 68.79 kJ/mol recomputed from Tc 330.0 K and Δν 40 Hz (Gutowsky–Holm, k_c = πΔν/√2 = 88.86 s⁻¹): off by -1.79 kJ/mol, tolerance ±1.00 kJ/mol","rule":"coalescence-barrier","rule_version":1,"severity":"error"}','checked by hand',NULL,'65dae24470a9d0c2ec76221ff090d239b2d440e3a1bede5c5bff19cd5576f165','30a8056045234200fa0fb798def97235f9f21ef8988c63b58ea1ba4fc664a706');
INSERT INTO "revision" VALUES(29,'measurement',8,'accept-finding','curator','2026-12-04 22:45:47.565241','{"accepted_by":null,"finding":13}','{"finding":13,"inputs_hash":"c15233542e776dd8fa1600b6413aa1436db3a81bf873793874d9b69ccbd18a5f","message":"ΔG‡ 60.00 kJ/mol does not match 55.55 kJ/mol recomputed from Tc 300.0 K and Δν 600 Hz (Gutowsky–Holm, k_c = πΔν/√2 = 1333 s⁻¹): off by +4.45 kJ/mol, tolerance ±1.00 kJ/mol","rule":"coalescence-barrier","rule_version":1,"severity":"error"}','checked by hand',NULL,'30a8056045234200fa0fb798def97235f9f21ef8988c63b58ea1ba4fc664a706','4974d00c7c3d174bef6f045452d78b3a77d474de8e04a117f9e3ab574f741415');
INSERT INTO "revision" VALUES(30,'measurement',11,'accept-finding','curator','2026-12-04 22:45:47.565334','{"accepted_by":null,"finding":17}','{"finding":17,"inputs_hash":"b18ad882e4f70df251d666d2201851c0939ca4ececd519b2870d3892d1535e0e","message":"Ea 60.00 kJ/mol does not match ΔH‡ + RT = 62.49 kJ/mol at 300.0 K (middle of the stated range): off by -2.49 kJ/mol, tolerance ±1.08 kJ/mol","rule":"ea-from-dh","rule_version":1,"severity":"warning"}','checked by hand',NULL,'4974d00c7c3d174bef6f045452d78b3a77d474de8e04a117f9e3ab574f741415','37b8ba9e082b0972b11c17d4b67c2f38aab3499ba0eb1744af824ae2cf740a52');
INSERT INTO "revision" VALUES(31,'measurement',24,'add','tester','2026-12-04 22:45:47.565927',NULL,'{"coalescence":{"dnu_hz":50.0,"dnu_text":"50 Hz","field_mhz":400.0,"field_text":"400 MHz","tc_k":300.0,"tc_text":"300 K"},"compound":{"label":"B-GH"},"dg_kj_mol":61.74,"dg_t_k":300.0,"dg_text":"61.74 kJ/mol","field_mhz":400.0,"field_text":"400 MHz","method":"coalescence","process":{"kind":"bond-rotation","nucleus":"1H","sites":""},"solvent_text":"toluene-d8","status":"draft"}',NULL,NULL,'37b8ba9e082b0972b11c17d4b67c2f38aab3499ba0eb1744af824ae2cf740a52','a0008d4ff30273c58df2b403bb12d87c2865de0c0010336b23dc0c6c505df25d');
INSERT INTO "revision" VALUES(32,'measurement',25,'add','tester','2026-12-04 22:45:47.576332',NULL,'{"coalescence":{"dnu_hz":50.0,"dnu_text":"50 Hz","field_mhz":400.0,"field_text":"400 MHz","tc_k":300.15,"tc_text":"27 °C"},"compound":{"label":"B-KCAL"},"dg_kj_mol":258.32016000000004,"dg_t_k":300.15,"dg_text":"61.74 kcal/mol","field_mhz":400.0,"field_text":"400 MHz","method":"coalescence","process":{"kind":"bond-rotation","nucleus":"1H","sites":""},"solvent_text":"toluene-d8","status":"draft"}',NULL,NULL,'a0008d4ff30273c58df2b403bb12d87c2865de0c0010336b23dc0c6c505df25d','bb23b138fcc72653d603deabcfa9a118ee0ec5758c0a942d1afcc46e946b147c');
INSERT INTO "revision" VALUES(33,'measurement',26,'add','tester','2026-12-04 22:45:47.591861',NULL,'{"coalescence":{"dnu_err_hz":1.0,"dnu_hz":12.0,"dnu_text":"12 ± 1 Hz","field_mhz":400.0,"field_text":"400 MHz","j_hz":14.0,"j_text":"14 Hz","tc_err_k":2.0,"tc_k":250.0,"tc_text":"250 ± 2 K"},"compound":{"label":"B-AB"},"dg_err_kj_mol":0.5,"dg_kj_mol":55.0,"dg_t_k":250.0,"dg_text":"55.0 ± 0.5 kJ/mol","field_mhz":400.0,"field_text":"400 MHz","method":"coalescence","process":{"kind":"bond-rotation","nucleus":"1H","sites":""},"solvent_text":"toluene-d8","status":"draft","t_max_k":280.0,"t_max_text":"280 K","t_min_k":220.0,"t_min_text":"220 K"}',NULL,NULL,'bb23b138fcc72653d603deabcfa9a118ee0ec5758c0a942d1afcc46e946b147c','203709d41c282175d83036a093979bb757dd87ecc2c53baed3ff34190fa09c42');
INSERT INTO "revision" VALUES(34,'measurement',27,'add','tester','2026-12-04 22:45:47.610630',NULL,'{"coalescence":{"dnu_hz":80.0,"dnu_text":"80 Hz","field_mhz":400.0,"field_text":"400 MHz","population_ratio":2.5,"population_text":"2.5","tc_k":320.0,"tc_text":"320 K"},"compound":{"label":"B-POP"},"dg_kj_mol":70.0,"dg_t_k":298.0,"dg_t_text":"298 K","dg_text":"70 kJ/mol","field_mhz":400.0,"field_text":"400 MHz","method":"coalescence","process":{"kind":"bond-rotation","nucleus":"1H","sites":""},"solvent_text":"toluene-d8","status":"draft"}',NULL,NULL,'203709d41c282175d83036a093979bb757dd87ecc2c53baed3ff34190fa09c42','0cefd331e245fd1042ca3fc89d5cb610261114e9480805a75d357d99cada1c63');
INSERT INTO "revision" VALUES(35,'measurement',28,'add','tester','2026-12-04 22:45:47.628869',NULL,'{"coalescence":{"dnu_hz":40.0,"dnu_text":"40 Hz","field_mhz":400.0,"field_text":"400 MHz","tc_k":343.15,"tc_text":"70 °C"},"compound":{"label":"B-HOT"},"dg_kj_mol":69.036,"dg_t_k":343.15,"dg_text":"16.5 kcal/mol","field_mhz":400.0,"field_text":"400 MHz","method":"coalescence","process":{"kind":"bond-rotation","nucleus":"1H","sites":""},"solvent_text":"CDCl3","status":"draft"}',NULL,NULL,'0cefd331e245fd1042ca3fc89d5cb610261114e9480805a75d357d99cada1c63','0564e9b546f6fe3f30545399b3a9050e487898bdb70023417a1e67673bfc7d5b');
INSERT INTO "revision" VALUES(36,'measurement',29,'add','tester','2026-12-04 22:45:47.651030',NULL,'{"coalescence":{"dnu_hz":40.0,"dnu_text":"40 Hz","field_mhz":400.0,"field_text":"400 MHz","tc_k":330.0,"tc_text":"330 K"},"compound":{"label":"B-RANGE"},"dg_kj_mol":67.0,"dg_t_k":330.0,"dg_text":"67 kJ/mol","field_mhz":400.0,"field_text":"400 MHz","method":"coalescence","process":{"kind":"bond-rotation","nucleus":"1H","sites":""},"solvent_text":"toluene-d8","status":"draft","t_max_k":320.0,"t_max_text":"320 K","t_min_k":250.0,"t_min_text":"250 K"}',NULL,NULL,'0564e9b546f6fe3f30545399b3a9050e487898bdb70023417a1e67673bfc7d5b','1e777e6439346c46fb86e414919c2b6f8c1c1eca422d7a3489dccb1af2b126d5');
INSERT INTO "revision" VALUES(37,'measurement',30,'add','tester','2026-12-04 22:45:47.676296',NULL,'{"coalescence":{"dnu_hz":8000.0,"dnu_text":"8000 Hz","field_mhz":400.0,"field_text":"400 MHz","tc_k":300.0,"tc_text":"300 K"},"compound":{"label":"B-WIDE"},"dg_kj_mol":50.0,"dg_t_k":300.0,"dg_text":"50 kJ/mol","field_mhz":400.0,"field_text":"400 MHz","method":"coalescence","process":{"kind":"bond-rotation","nucleus":"1H","sites":""},"solvent_text":"toluene-d8","status":"draft"}',NULL,NULL,'1e777e6439346c46fb86e414919c2b6f8c1c1eca422d7a3489dccb1af2b126d5','19a5890ca0e71688c438357021711683b4b8dcf7a2af69bd73ae43340ed21748');
INSERT INTO "revision" VALUES(38,'measurement',31,'add','tester','2026-12-04 22:45:47.688325',NULL,'{"coalescence":{"dnu_hz":150.87012000000001,"dnu_text":"1.5 ppm","field_mhz":400.0,"field_text":"400 MHz","tc_k":300.0,"tc_text":"300 K"},"compound":{"label":"B-C13"},"dg_kj_mol":60.0,"dg_t_k":300.0,"dg_text":"60 kJ/mol","field_mhz":400.0,"field_text":"400 MHz","method":"coalescence","process":{"kind":"bond-rotation","nucleus":"13C","sites":""},"solvent_text":"toluene-d8","status":"draft"}',NULL,NULL,'19a5890ca0e71688c438357021711683b4b8dcf7a2af69bd73ae43340ed21748','6d19c22f202e84584ed05a1a413ad7e062e436800a3ed36cc6e5618734ecf2c4');
INSERT INTO "revision" VALUES(39,'measurement',32,'add','tester','2026-12-04 22:45:47.706136',NULL,'{"coalescence":{"dnu_hz":20.0,"dnu_text":"20 Hz","field_mhz":0.04,"field_text":"40 kHz","tc_k":300.0,"tc_text":"300 K"},"compound":{"label":"B-KHZ"},"field_mhz":0.04,"field_text":"40 kHz","method":"coalescence","process":{"kind":"bond-rotation","nucleus":"1H","sites":""},"solvent_text":"toluene-d8","status":"draft"}',NULL,NULL,'6d19c22f202e84584ed05a1a413ad7e062e436800a3ed36cc6e5618734ecf2c4','0e2264725be254d96ba8d6eedbc5d18e2e746ceafe6d5d64c6fac5e785ec865f');
INSERT INTO "revision" VALUES(40,'measurement',33,'add','tester','2026-12-04 22:45:47.717252',NULL,'{"compound":{"label":"B-REFIT"},"dh_kj_mol":65.0,"dh_text":"65 kJ/mol","ds_j_mol_k":20.0,"ds_text":"+20 J/(mol K)","method":"lineshape","process":{"kind":"ring-inversion","nucleus":"1H","sites":""},"rates":[["280 K","96.2662 s-1"],["295 K","337.164 s-1"],["310 K","1048.57 s-1"],["325 K","2943.33 s-1"],["340 K","7558.12 s-1"]],"solvent_text":"toluene-d8","status":"draft"}',NULL,NULL,'0e2264725be254d96ba8d6eedbc5d18e2e746ceafe6d5d64c6fac5e785ec865f','bf8ab9343931b359fcc4187d974c1f1e257d232297813046b60ef46680047e21');
INSERT INTO "revision" VALUES(41,'measurement',34,'add','tester','2026-12-04 22:45:47.739016',NULL,'{"compound":{"label":"B-EA"},"dh_kj_mol":60.0,"dh_text":"60 kJ/mol","ea_kj_mol":60.0,"ea_text":"60 kJ/mol","method":"lineshape","process":{"kind":"ring-inversion","nucleus":"1H","sites":""},"solvent_text":"toluene-d8","status":"draft","t_max_k":310.0,"t_max_text":"310 K","t_min_k":290.0,"t_min_text":"290 K"}',NULL,NULL,'bf8ab9343931b359fcc4187d974c1f1e257d232297813046b60ef46680047e21','e67932e38d0426f2076d7422e6c0eb710b9469b588750b10b24831255c95ab23');
INSERT INTO "revision" VALUES(42,'measurement',35,'add','tester','2026-12-04 22:45:47.749974',NULL,'{"compound":{"label":"B-EU"},"dg_kj_mol":71.128,"dg_t_k":300.0,"dg_t_text":"300 K","dg_text":"17.0 kcal/mol","dh_kj_mol":58.576,"dh_text":"14 kcal/mol","ds_j_mol_k":-20.92,"ds_text":"-5 e.u.","method":"lineshape","process":{"kind":"ring-inversion","nucleus":"1H","sites":""},"solvent_text":"toluene-d8","status":"draft"}',NULL,NULL,'e67932e38d0426f2076d7422e6c0eb710b9469b588750b10b24831255c95ab23','af98ace1266b337792c8d47f90f330467a05838b4c83fb54e46ace66c9dd21e5');
INSERT INTO "revision" VALUES(43,'measurement',36,'add','tester','2026-12-04 22:45:47.766292',NULL,'{"compound":{"label":"B-SWAP"},"method":"lineshape","process":{"kind":"ring-inversion","nucleus":"1H","sites":""},"solvent_text":"toluene-d8","status":"draft","t_max_k":253.14999999999998,"t_max_text":"-20 °C","t_min_k":303.15,"t_min_text":"30 °C"}',NULL,NULL,'af98ace1266b337792c8d47f90f330467a05838b4c83fb54e46ace66c9dd21e5','a5de46e4ee3328f4b0b92b14b12f9a2eabaad6f0fad0f335be1884e5adaf49a8');
INSERT INTO "revision" VALUES(44,'measurement',37,'add','tester','2026-12-04 22:45:47.777478',NULL,'{"compound":{"label":"B-COLD"},"method":"lineshape","process":{"kind":"ring-inversion","nucleus":"1H","sites":""},"solvent_text":"DMSO-d6","status":"draft","t_max_k":353.15,"t_max_text":"80 °C","t_min_k":273.15,"t_min_text":"0 °C"}',NULL,NULL,'a5de46e4ee3328f4b0b92b14b12f9a2eabaad6f0fad0f335be1884e5adaf49a8','036283dd3ee241b41a3e15b1a8516dbe7c28b77a8262c8e730ad04fef9932be7');
INSERT INTO "revision" VALUES(45,'measurement',38,'add','tester','2026-12-04 22:45:47.793698',NULL,'{"compound":{"label":"B-LOW"},"dg_kj_mol":14.644,"dg_t_k":150.0,"dg_t_text":"150 K","dg_text":"3.5 kcal/mol","method":"lineshape","process":{"kind":"ring-inversion","nucleus":"1H","sites":""},"solvent_text":"toluene-d8","status":"draft"}',NULL,NULL,'036283dd3ee241b41a3e15b1a8516dbe7c28b77a8262c8e730ad04fef9932be7','311920421dbb7d926f0b3db49bf6a2e741195e36b19964dcbfc47b212cb37787');
INSERT INTO "revision" VALUES(46,'measurement',39,'add','tester','2026-12-04 22:45:47.808661',NULL,'{"compound":{"label":"B-ZERO"},"dg_kj_mol":60.0,"dg_t_k":300.0,"dg_t_text":"300 K","dg_text":"60 kJ/mol","method":"lineshape","process":{"kind":"ring-inversion","nucleus":"1H","sites":""},"solvent_text":"toluene-d8","status":"draft","t_max_k":300.0,"t_max_text":"300 K","t_min_k":0.0,"t_min_text":"0 K"}',NULL,NULL,'311920421dbb7d926f0b3db49bf6a2e741195e36b19964dcbfc47b212cb37787','fb36fcb7e06f8abec5b5dd4eb33ca779ef9da1c83dcf74f08e2519c58d230912');
INSERT INTO "revision" VALUES(47,'measurement',40,'add','tester','2026-12-04 22:45:47.823001',NULL,'{"compound":{"label":"B-BAD","smiles_input":"C(C)(C)(C)(C)COOO"},"dg_kj_mol":60.0,"dg_t_k":300.0,"dg_t_text":"300 K","dg_text":"60 kJ/mol","method":"lineshape","process":{"kind":"ring-inversion","nucleus":"1H","sites":""},"solvent_text":"toluene-d8","status":"draft"}',NULL,NULL,'fb36fcb7e06f8abec5b5dd4eb33ca779ef9da1c83dcf74f08e2519c58d230912','f5482b43189cee1f8b0e7c42b8d06efbf0b0ee26aea2251e78ec66e902c5f692');
INSERT INTO "revision" VALUES(48,'measurement',41,'add','tester','2026-12-04 22:45:47.838590',NULL,'{"compound":{"label":"B-DUP"},"dg_kj_mol":60.0,"dg_t_k":300.0,"dg_t_text":"300 K","dg_text":"60 kJ/mol","method":"lineshape","process":{"kind":"ring-inversion","nucleus":"1H","sites":""},"solvent_text":"CDCl3","status":"draft"}',NULL,NULL,'f5482b43189cee1f8b0e7c42b8d06efbf0b0ee26aea2251e78ec66e902c5f692','833d0b1e77aff9a5a9c1ba1c14ef5ac1a44ef4b55a7298f3d20abacacd9670e1');
INSERT INTO "revision" VALUES(49,'measurement',42,'add','tester','2026-12-04 22:45:47.847331',NULL,'{"compound":{"label":"B-DUP"},"dg_kj_mol":65.0,"dg_t_k":305.0,"dg_t_text":"305 K","dg_text":"65 kJ/mol","method":"lineshape","process":{"kind":"ring-inversion","nucleus":"1H","sites":""},"solvent_text":"chloroform-d","status":"draft"}',NULL,NULL,'833d0b1e77aff9a5a9c1ba1c14ef5ac1a44ef4b55a7298f3d20abacacd9670e1','8e4d7b8b0d1eecbee3a9ac752aa3d19ff0754c1e21c3002d747ea65771f9b22f');
INSERT INTO "revision" VALUES(50,'measurement',43,'add','tester','2026-12-04 22:45:47.870475',NULL,'{"compound":{"label":"B-DUP"},"dg_kj_mol":65.0,"dg_t_k":300.0,"dg_t_text":"300 K","dg_text":"65 kJ/mol","method":"lineshape","process":{"kind":"ring-inversion","nucleus":"1H","sites":""},"solvent_text":"CDCl3","status":"draft"}',NULL,NULL,'8e4d7b8b0d1eecbee3a9ac752aa3d19ff0754c1e21c3002d747ea65771f9b22f','5cadf0f48237f77aa3e4c1df66d02d95ac3cd6aa9ff71300f46448ce9b616ccb');
INSERT INTO "revision" VALUES(51,'measurement',44,'add','tester','2026-12-04 22:45:47.889121',NULL,'{"compound":{"label":"B-DUP"},"dg_err_kj_mol":2.0,"dg_kj_mol":59.5,"dg_t_k":301.0,"dg_t_text":"301 K","dg_text":"59.5 ± 2 kJ/mol","method":"lineshape","process":{"kind":"ring-inversion","nucleus":"1H","sites":""},"solvent_text":"CDCl3","status":"draft"}',NULL,NULL,'5cadf0f48237f77aa3e4c1df66d02d95ac3cd6aa9ff71300f46448ce9b616ccb','70ac8bc6c6acc0b5a3ea063cca7b128346aa7cfe571f0a667d61fd9cf77bbc4f');
INSERT INTO "revision" VALUES(52,'measurement',45,'add','tester','2026-12-04 22:45:47.908169',NULL,'{"compound":{"label":"B-SLOW"},"dg_kj_mol":110.0,"dg_t_k":350.0,"dg_t_text":"350 K","dg_text":"110 kJ/mol","method":"equilibration","process":{"kind":"bond-rotation","nucleus":"","sites":""},"solvent_text":"DMSO-d6","status":"draft"}',NULL,NULL,'70ac8bc6c6acc0b5a3ea063cca7b128346aa7cfe571f0a667d61fd9cf77bbc4f','ea9c5386764afafeb2dde4b0070085028930e56eb18d2fa6eca02603b7a0bcb1');
INSERT INTO "revision" VALUES(53,'measurement',46,'add','tester','2026-12-04 22:45:47.919192',NULL,'{"compound":{"label":"B-GONE"},"dg_kj_mol":5.0,"dg_t_k":300.0,"dg_t_text":"300 K","dg_text":"5 kJ/mol","method":"lineshape","process":{"kind":"ring-inversion","nucleus":"1H","sites":""},"solvent_text":"toluene-d8","status":"draft"}',NULL,NULL,'ea9c5386764afafeb2dde4b0070085028930e56eb18d2fa6eca02603b7a0bcb1','67c63071615770ed0e91926ec0780d2b0b0b68e0c993a250af88d5110c4c8eb6');
INSERT INTO "revision" VALUES(54,'measurement',30,'accept-finding','curator','2026-12-04 22:45:48.266368','{"accepted_by":null,"finding":41}','{"finding":41,"inputs_hash":"10361d499ccdddc849944cded00acb99dc0076617a7800136fa3b6e47a82e8f9","message":"Δν 8000 Hz at 400 MHz is 20 ppm, more than the ~15 ppm a 1H shift difference can plausibly be: Hz and ppm, or the field, may be mixed up","rule":"dnu-field","rule_version":1,"severity":"warning"}','known',NULL,'67c63071615770ed0e91926ec0780d2b0b0b68e0c993a250af88d5110c4c8eb6','6d458e70661da21178a3d643aee3c16853533d6cfda9d8f6f6761132fd700195');
INSERT INTO "revision" VALUES(55,'measurement',32,'accept-finding','curator','2026-12-04 22:45:48.266552','{"accepted_by":null,"finding":43}','{"finding":43,"inputs_hash":"568a35d39d7b172ac858a274379613b7f285462aaa875194dec908ce27797336","message":"spectrometer frequency 0.04 MHz is outside 40–1300 MHz: not a 1H frequency of an NMR magnet; check the field and its unit","rule":"dnu-field","rule_version":1,"severity":"warning"}','known',NULL,'6d458e70661da21178a3d643aee3c16853533d6cfda9d8f6f6761132fd700195','63b727ef637baba08f7dd63f8fcf3821cfa5f4cebc05f6859df3b63bd06b6921');
INSERT INTO "revision" VALUES(56,'measurement',33,'accept-finding','curator','2026-12-04 22:45:48.266654','{"accepted_by":null,"finding":64}','{"finding":64,"inputs_hash":"b72457d6d1e85fb127444b9137bfd14a459ae1e2e9c67ad1f9298cfa924d858f","message":"ΔH‡ 65.00 kJ/mol does not match 55.00 kJ/mol from an Eyring refit of the 5 stored rate points: off by +10.00 kJ/mol, tolerance ±2.83 kJ/mol","rule":"activation-refit","rule_version":1,"severity":"warning"}','known',NULL,'63b727ef637baba08f7dd63f8fcf3821cfa5f4cebc05f6859df3b63bd06b6921','fe8b7407853208012ed3d07f565d427c8e30b25025c2e10747096716f89d63b2');
INSERT INTO "revision" VALUES(57,'measurement',33,'accept-finding','curator','2026-12-04 22:45:48.266751','{"accepted_by":null,"finding":65}','{"finding":65,"inputs_hash":"36a81c6486e1ac69ceb7ee8b28b5f8ead01c9ae28d6cd8cf43c2f2bb9665839e","message":"ΔS‡ 20.00 J/(mol·K) does not match -10.00 J/(mol·K) from an Eyring refit of the 5 stored rate points: off by +30.00 J/(mol·K), tolerance ±8.71 J/(mol·K)","rule":"activation-refit","rule_version":1,"severity":"warning"}','known',NULL,'fe8b7407853208012ed3d07f565d427c8e30b25025c2e10747096716f89d63b2','1414ff82d3b7eedc990f66a4f0d00fc9f72293cf10dfc1c21391e9f8ec8a8c21');
INSERT INTO "revision" VALUES(58,'measurement',36,'accept-finding','curator','2026-12-04 22:45:48.266859','{"accepted_by":null,"finding":48}','{"finding":48,"inputs_hash":"b527f7218be5b40bac6893d47cd1582a3d37c9e7dc8a607ebb3bb9e2853bfbcf","message":"T_min 30.0 °C (303.1 K) is above T_max -20.0 °C (253.1 K): the two are probably swapped or one has the wrong unit","rule":"temperature-range-order","rule_version":1,"severity":"error"}','known',NULL,'1414ff82d3b7eedc990f66a4f0d00fc9f72293cf10dfc1c21391e9f8ec8a8c21','b2115e508f1a5b907fb7984a8e4b63e447e2d251e522f090e35c50c3b1d5b285');
CREATE TABLE solvent (
	id INTEGER NOT NULL, 
	name VARCHAR(64) NOT NULL, 
	formula VARCHAR(64) NOT NULL, 
	deuterated BOOLEAN NOT NULL, 
	mp_k FLOAT, 
	bp_k FLOAT, 
	source TEXT NOT NULL, 
	aliases TEXT NOT NULL, 
	CONSTRAINT pk_solvent PRIMARY KEY (id), 
	CONSTRAINT uq_solvent_name UNIQUE (name)
);
INSERT INTO "solvent" VALUES(1,'chloroform-d','CDCl3',1,209.15,334.15,'CRC Handbook of Chemistry and Physics (physical constants of organic compounds), parent compound; from memory','cdcl3|chloroform|deuterochloroform|dcloroform|chcl3');
INSERT INTO "solvent" VALUES(2,'dichloromethane-d2','CD2Cl2',1,176.15,313.15,'CRC Handbook of Chemistry and Physics (physical constants of organic compounds), parent compound; from memory','cd2cl2|dcm|dcmd2|dichloromethane|methylenechloride|ch2cl2|d2dcm');
INSERT INTO "solvent" VALUES(3,'dimethyl sulfoxide-d6','C2D6OS',1,291.65,462.15,'CRC Handbook of Chemistry and Physics (physical constants of organic compounds), parent compound; from memory','dmsod6|d6dmso|dmso|cd32so|dimethylsulfoxide');
INSERT INTO "solvent" VALUES(4,'acetone-d6','C3D6O',1,178.15,329.15,'CRC Handbook of Chemistry and Physics (physical constants of organic compounds), parent compound; from memory','acetoned6|d6acetone|acetone|cd32co');
INSERT INTO "solvent" VALUES(5,'toluene-d8','C7D8',1,178.15,384.15,'CRC Handbook of Chemistry and Physics (physical constants of organic compounds), parent compound; from memory','toluened8|d8toluene|toluene|told8|c7d8|tol');
INSERT INTO "solvent" VALUES(6,'benzene-d6','C6D6',1,279.95,352.15,'deuterated-solvent supplier data sheet value; from memory','c6d6|benzened6|d6benzene|benzene');
INSERT INTO "solvent" VALUES(7,'methanol-d4','CD3OD',1,175.15,338.15,'CRC Handbook of Chemistry and Physics (physical constants of organic compounds), parent compound; from memory','cd3od|methanold4|d4methanol|methanol|meod|meodd4');
INSERT INTO "solvent" VALUES(8,'deuterium oxide','D2O',1,276.95,374.55,'deuterated-solvent supplier data sheet value; from memory','d2o|heavywater|water|deuteriumoxide');
INSERT INTO "solvent" VALUES(9,'acetonitrile-d3','CD3CN',1,228.15,355.15,'CRC Handbook of Chemistry and Physics (physical constants of organic compounds), parent compound; from memory','cd3cn|acetonitriled3|d3acetonitrile|acetonitrile|mecn|mecnd3');
INSERT INTO "solvent" VALUES(10,'tetrahydrofuran-d8','C4D8O',1,165.15,339.15,'CRC Handbook of Chemistry and Physics (physical constants of organic compounds), parent compound; from memory','thfd8|d8thf|thf|tetrahydrofuran');
INSERT INTO "solvent" VALUES(11,'pyridine-d5','C5D5N',1,231.15,388.15,'CRC Handbook of Chemistry and Physics (physical constants of organic compounds), parent compound; from memory','pyridined5|d5pyridine|pyridine|c5d5n|pyd5');
INSERT INTO "solvent" VALUES(12,'1,1,2,2-tetrachloroethane-d2','C2D2Cl4',1,229.15,419.15,'CRC Handbook of Chemistry and Physics (physical constants of organic compounds), parent compound; from memory','tced2|c2d2cl4|tetrachloroethane|tetrachloroethaned2|1122tetrachloroethaned2|tce');
INSERT INTO "solvent" VALUES(13,'nitrobenzene-d5','C6D5NO2',1,278.85,484.15,'CRC Handbook of Chemistry and Physics (physical constants of organic compounds), parent compound; from memory','nitrobenzened5|nitrobenzene|c6d5no2');
INSERT INTO "solvent" VALUES(14,'N,N-dimethylformamide-d7','C3D7NO',1,212.15,426.15,'CRC Handbook of Chemistry and Physics (physical constants of organic compounds), parent compound; from memory','dmfd7|d7dmf|dmf|dimethylformamide|nndimethylformamided7');
INSERT INTO "solvent" VALUES(15,'1,2-dichlorobenzene-d4','C6D4Cl2',1,256.15,453.15,'CRC Handbook of Chemistry and Physics (physical constants of organic compounds), parent compound; from memory','odcbd4|odichlorobenzene|12dichlorobenzened4|dichlorobenzene|odcb');
INSERT INTO "solvent" VALUES(16,'chlorobenzene-d5','C6D5Cl',1,228.15,405.15,'CRC Handbook of Chemistry and Physics (physical constants of organic compounds), parent compound; from memory','chlorobenzened5|chlorobenzene|c6d5cl|phcl');
INSERT INTO "solvent" VALUES(17,'1,4-dioxane-d8','C4D8O2',1,285.15,374.15,'CRC Handbook of Chemistry and Physics (physical constants of organic compounds), parent compound; from memory','dioxaned8|dioxane|14dioxaned8|14dioxane');
INSERT INTO "solvent" VALUES(18,'diethyl ether-d10','C4D10O',1,157.15,308.15,'CRC Handbook of Chemistry and Physics (physical constants of organic compounds), parent compound; from memory','et2od10|diethylether|ether|et2o|diethyletherd10');
INSERT INTO "solvent" VALUES(19,'carbon disulfide','CS2',0,161.15,319.15,'CRC Handbook of Chemistry and Physics (physical constants of organic compounds), parent compound; from memory','cs2|carbondisulfide');
INSERT INTO "solvent" VALUES(20,'dimethyl ether-d6','C2D6O',1,132.15,249.15,'CRC Handbook of Chemistry and Physics (physical constants of organic compounds), parent compound; from memory','dimethylether|me2o|me2od6|dimethyletherd6');
CREATE TABLE validation_finding (
	id INTEGER NOT NULL, 
	measurement_id INTEGER NOT NULL, 
	rule_id VARCHAR(64) NOT NULL, 
	rule_version INTEGER NOT NULL, 
	severity VARCHAR(16) NOT NULL, 
	message TEXT NOT NULL, 
	reported FLOAT, 
	recomputed FLOAT, 
	difference FLOAT, 
	unit VARCHAR(32), 
	likely_cause TEXT, 
	inputs_hash VARCHAR(64), 
	found_at DATETIME NOT NULL, 
	accepted_by VARCHAR(128), 
	accepted_at DATETIME, 
	accept_reason TEXT, 
	CONSTRAINT pk_validation_finding PRIMARY KEY (id), 
	CONSTRAINT fk_validation_finding_measurement_id_measurement FOREIGN KEY(measurement_id) REFERENCES measurement (id)
);
INSERT INTO "validation_finding" VALUES(3,3,'coalescence-barrier',1,'error','ΔG‡ 55.00 kJ/mol does not match 51.74 kJ/mol recomputed from Tc 250.0 K and Δν 12 Hz (coupled AB, J = 14 Hz, k_c = π√(Δν²+6J²)/√2 = 80.71 s⁻¹): off by +3.26 kJ/mol, tolerance ±1.66 kJ/mol',55.0,5.17379677901970751446e+01,3.26203220980292485364e+00,'kJ/mol','the coupled AB pair (J = 14.0 Hz) treated with the uncoupled k_c = πΔν/√2 (gives 54.04 kJ/mol) [coupled-as-uncoupled]','59de97fcd9f1e9fa96d26a886e533675400ef76a5935667e2fd2de4cdf94c96b','2026-12-04 22:45:47.168487','curator','2026-12-04 22:45:47.564827','checked by hand');
INSERT INTO "validation_finding" VALUES(4,4,'coalescence-barrier',1,'error','ΔG‡ 70.00 kJ/mol does not match 67.46 kJ/mol recomputed from Tc 320.0 K and Δν 80 Hz (unequal populations 2.50:1, Shanan-Atidi–Bar-Eli, leaving the major site, k = 64.91 s⁻¹): off by +2.54 kJ/mol, tolerance ±1.22 kJ/mol (ΔG‡ is quoted at 298.0 K; compared allowing for a small ΔS‡)',70.0,6.74610928931149800291e+01,2.53890710688502,'kJ/mol','Δν in Hz read at 200 MHz, not at the stated 400 MHz (gives 69.31 kJ/mol) [dnu-other-field]','1ac572a593fbd5cd3171a1e366029bca801e0e73d6a42d44974985467795b99a','2026-12-04 22:45:47.259148','curator','2026-12-04 22:45:47.564939','checked by hand');
INSERT INTO "validation_finding" VALUES(5,5,'coalescence-barrier',1,'error','ΔG‡ 16.50 kcal/mol does not match 17.12 kcal/mol recomputed from Tc 70.0 °C (343.1 K) and Δν 40 Hz (Gutowsky–Holm, k_c = πΔν/√2 = 88.86 s⁻¹): off by -0.62 kcal/mol, tolerance ±0.24 kcal/mol',16.5,1.71234952745149229258e+01,-6.23495274514922925845e-01,'kcal/mol','k_c taken as 2πΔν instead of πΔν/√2 (gives 16.41 kcal/mol) [kc-2pi-dnu]; Δν in Hz read at 1000 MHz, not at the stated 400 MHz (gives 16.50 kcal/mol) [dnu-other-field]','bff4b9eab27ac8a65cfa4521edf0595cea37a933301aed91b2dbde2ae8405360','2026-12-04 22:45:47.276125','curator','2026-12-04 22:45:47.565030','checked by hand');
INSERT INTO "validation_finding" VALUES(6,5,'solvent-liquid-range',1,'warning','Tc 70.0 °C (343.1 K) is above the boiling point of chloroform-d at 1 atm (61.0 °C (334.1 K)): heating a sample above its boiling point needs a pressure-rated sealed NMR tube used within its rating. Follow your facility''s safety rules and local regulations; these notes do not replace them. If no sealed tube was used, check the temperature, its unit, or the solvent.',70.0,61.0,9.0,'°C',NULL,'319dab33567c6e9bfcff89b31853c7ce425a7c39092accb61b06e0763da41ac8','2026-12-04 22:45:47.276125',NULL,NULL,NULL);
INSERT INTO "validation_finding" VALUES(7,6,'coalescence-barrier',1,'error','ΔG‡ 67.00 kJ/mol does not match 68.79 kJ/mol recomputed from Tc 330.0 K and Δν 40 Hz (Gutowsky–Holm, k_c = πΔν/√2 = 88.86 s⁻¹): off by -1.79 kJ/mol, tolerance ±1.00 kJ/mol',67.0,6.87919634824116315013e+01,-1.79196348241163150305e+00,'kJ/mol','k_c taken as πΔν instead of πΔν/√2 (gives 67.84 kJ/mol) [kc-pi-dnu]; Δν in Hz read at 800 MHz, not at the stated 400 MHz (gives 66.89 kJ/mol) [dnu-other-field]','eb9f901dd3a2ac9314cc863b37d5ce16ca1c4db79d32ecaecffabd8be8d9b388','2026-12-04 22:45:47.290536','curator','2026-12-04 22:45:47.565127','checked by hand');
INSERT INTO "validation_finding" VALUES(8,6,'tc-in-range',1,'warning','Tc 330.0 K is above the measured range (T_max 320.0 K): coalescence cannot have been observed there; check Tc, the range, or their units',330.0,320.0,10.0,'K',NULL,'4cbf664e6b7d2a73dd65327681d2ee6f3793bd5358f6b7e1cffe78f46d30a880','2026-12-04 22:45:47.290536',NULL,NULL,NULL);
INSERT INTO "validation_finding" VALUES(9,7,'dnu-field',1,'warning','Δν 8000 Hz at 400 MHz is 20 ppm, more than the ~15 ppm a 1H shift difference can plausibly be: Hz and ppm, or the field, may be mixed up',20.0,15.0,5.0,'ppm',NULL,'10361d499ccdddc849944cded00acb99dc0076617a7800136fa3b6e47a82e8f9','2026-12-04 22:45:47.302171',NULL,NULL,NULL);
INSERT INTO "validation_finding" VALUES(11,9,'dnu-field',1,'warning','spectrometer frequency 0.04 MHz is outside 40–1300 MHz: not a 1H frequency of an NMR magnet; check the field and its unit',0.04,NULL,NULL,'MHz',NULL,'568a35d39d7b172ac858a274379613b7f285462aaa875194dec908ce27797336','2026-12-04 22:45:47.328783',NULL,NULL,NULL);
INSERT INTO "validation_finding" VALUES(12,2,'coalescence-barrier',1,'error','ΔG‡ 258.32 kJ/mol does not match 61.78 kJ/mol recomputed from Tc 27.0 °C (300.1 K) and Δν 50 Hz (Gutowsky–Holm, k_c = πΔν/√2 = 111.1 s⁻¹): off by +196.54 kJ/mol, tolerance ±1.00 kJ/mol',2.58320160000000043965e+02,6.17759365171721128726e+01,1.96544223482827931093e+02,'kJ/mol','a kJ/mol value labelled kcal/mol (gives 258.47 kJ/mol) [kj-as-kcal]','32aecedd9a98c41936ecce6ccc2172afa1f5c5424b82a021e741f29da22ee9df','2026-12-04 22:45:47.563716','curator','2026-12-04 22:45:47.564654','checked by hand');
INSERT INTO "validation_finding" VALUES(13,8,'coalescence-barrier',1,'error','ΔG‡ 60.00 kJ/mol does not match 55.55 kJ/mol recomputed from Tc 300.0 K and Δν 600 Hz (Gutowsky–Holm, k_c = πΔν/√2 = 1333 s⁻¹): off by +4.45 kJ/mol, tolerance ±1.00 kJ/mol',60.0,5.55456180926964364612e+01,4.45438190730356353697e+00,'kJ/mol',NULL,'c15233542e776dd8fa1600b6413aa1436db3a81bf873793874d9b69ccbd18a5f','2026-12-04 22:45:47.563716','curator','2026-12-04 22:45:47.565231','checked by hand');
INSERT INTO "validation_finding" VALUES(14,12,'dg-from-dh-ds',1,'error','ΔG‡ 17.00 kcal/mol at 300.0 K does not match ΔH‡ − TΔS‡ = 15.50 kcal/mol (ΔH‡ 14.00 kcal/mol, ΔS‡ -20.9 J/(mol·K)): off by +1.50 kcal/mol, tolerance ±0.24 kcal/mol',17.0,15.5,1.5,'kcal/mol',NULL,'881e3ebd2d9c07e3bd3debafda0dba66d534bf26fc1610c27e258a8765510773','2026-12-04 22:45:47.563716',NULL,NULL,NULL);
INSERT INTO "validation_finding" VALUES(15,10,'activation-refit',1,'warning','ΔH‡ 65.00 kJ/mol does not match 55.00 kJ/mol from an Eyring refit of the 5 stored rate points: off by +10.00 kJ/mol, tolerance ±2.83 kJ/mol',65.0,5.50000037986631511426e+01,9.99999620133684885558e+00,'kJ/mol',NULL,'88cb4e0c13eb1ff518ef086cb9f0b6d442047049eb0b1aa6ae72483edfbc36ed','2026-12-04 22:45:47.563716',NULL,NULL,NULL);
INSERT INTO "validation_finding" VALUES(16,10,'activation-refit',1,'warning','ΔS‡ 20.00 J/(mol·K) does not match -10.00 J/(mol·K) from an Eyring refit of the 5 stored rate points: off by +30.00 J/(mol·K), tolerance ±8.71 J/(mol·K)',20.0,-9.99998793631894677957e+00,2.99999879363189450023e+01,'J/(mol·K)',NULL,'70ac2eb394a4a55965187be15f2edc5ee6fab7ef34e1d7d636129bf58def8b3e','2026-12-04 22:45:47.563716',NULL,NULL,NULL);
INSERT INTO "validation_finding" VALUES(17,11,'ea-from-dh',1,'warning','Ea 60.00 kJ/mol does not match ΔH‡ + RT = 62.49 kJ/mol at 300.0 K (middle of the stated range): off by -2.49 kJ/mol, tolerance ±1.08 kJ/mol',60.0,6.24943387854459757573e+01,-2.4943387854459757591e+00,'kJ/mol','Ea and ΔH‡ given the same value (the RT term left out)','b18ad882e4f70df251d666d2201851c0939ca4ececd519b2870d3892d1535e0e','2026-12-04 22:45:47.563716','curator','2026-12-04 22:45:47.565324','checked by hand');
INSERT INTO "validation_finding" VALUES(18,16,'temperature-positive',1,'error','T_min is 0.00 K: a temperature must be above absolute zero',0.0,NULL,NULL,'K',NULL,'fa53d89181c874442327a3c7c85ec1fbe12778555f4700295509455b7e671f04','2026-12-04 22:45:47.563716',NULL,NULL,NULL);
INSERT INTO "validation_finding" VALUES(19,1,'temperature-positive',1,'error','a rate point is at -5.00 K: a temperature must be above absolute zero',-5.0,NULL,NULL,'K',NULL,'e571ed353136bd2889ac690bb9882443c8644b80579cac4de0d1af78f2746569','2026-12-04 22:45:47.563716',NULL,NULL,NULL);
INSERT INTO "validation_finding" VALUES(20,13,'temperature-range-order',1,'error','T_min 30.0 °C (303.1 K) is above T_max -20.0 °C (253.1 K): the two are probably swapped or one has the wrong unit',30.0,-20.0,50.0,'°C',NULL,'b48bac59ccbc93129d6af6a2ae104811e99fe888b83dc41e48f5cce79a0aa788','2026-12-04 22:45:47.563716',NULL,NULL,NULL);
INSERT INTO "validation_finding" VALUES(21,1,'solvent-liquid-range',1,'warning','a rate point -5.0 K is below the melting point of toluene-d8 (178.2 K): the sample would be frozen; check the temperature, its unit, or the solvent',-5.0,178.15,-183.15,'K',NULL,'4048c7b5205878832cd87f706567652df48c16ae0b2d4415a1762787ebf0b923','2026-12-04 22:45:47.563716',NULL,NULL,NULL);
INSERT INTO "validation_finding" VALUES(22,14,'solvent-liquid-range',1,'warning','T_min 0.0 °C (273.1 K) is below the melting point of dimethyl sulfoxide-d6 (18.5 °C (291.6 K)): the sample would be frozen; check the temperature, its unit, or the solvent',0.0,18.5,-18.5,'°C',NULL,'d654e056b5b59c807e23be1d73e8f784993ed7f0c1d8566ce83bd40bbc60c275','2026-12-04 22:45:47.563716',NULL,NULL,NULL);
INSERT INTO "validation_finding" VALUES(23,16,'solvent-liquid-range',1,'warning','T_min 0.0 K is below the melting point of toluene-d8 (178.2 K): the sample would be frozen; check the temperature, its unit, or the solvent',0.0,178.15,-178.15,'K',NULL,'51c23f93c065f17fb00895de6257fd11be9afb505bc48b33a00d48c6bd6dbf5f','2026-12-04 22:45:47.563716',NULL,NULL,NULL);
INSERT INTO "validation_finding" VALUES(24,2,'barrier-method-range',1,'warning','ΔG‡ 258.32 kJ/mol is above the range dynamic NMR can measure (about 20–100 kJ/mol) for a coalescence measurement: check the value, its unit, or the method',2.58320160000000043965e+02,100.0,1.58320160000000043965e+02,'kJ/mol',NULL,'47276fc12c856e1896edc5bc37dc1da98006862415bbdc068c9f3c981f08981d','2026-12-04 22:45:47.563716',NULL,NULL,NULL);
INSERT INTO "validation_finding" VALUES(25,15,'barrier-method-range',1,'warning','ΔG‡ 3.50 kcal/mol is below the range dynamic NMR can measure (about 5–24 kcal/mol) for a lineshape measurement: check the value, its unit, or the method',3.5,4.78011472275334625692e+00,-1.28011472275334603487e+00,'kcal/mol',NULL,'43d79453e6e47be968ee8c9748c6df29a5127335739dbc64d3fa9813a13c4ce2','2026-12-04 22:45:47.563716',NULL,NULL,NULL);
INSERT INTO "validation_finding" VALUES(26,8,'dnu-ppm-nucleus',1,'warning','Δν 1.5 ppm of 13C was converted with the 1H frequency (400 MHz) to 600 Hz; 13C is observed at 100.6 MHz on that magnet, so Δν is 150.9 Hz and the barrier recomputed from it changes; re-enter Δν in Hz',600.0,1.50870120000000014211e+02,4.49129879999999957361e+02,'Hz',NULL,'6ead7a9ddfa17e8d627533448ace1845b4a08413301a8aa8a81a927adb65c74e','2026-12-04 22:45:47.563716',NULL,NULL,NULL);
INSERT INTO "validation_finding" VALUES(27,11,'structure-parse',1,'note','the SMILES of compound A-EA does not parse cleanly (hand-edited); it is kept as entered, but structure searches may miss it',NULL,NULL,NULL,NULL,NULL,'baa8b7d8e806d0fe760978b66f96fecee2ad57dd543b21b7b26931b0fac58798','2026-12-04 22:45:47.563716',NULL,NULL,NULL);
INSERT INTO "validation_finding" VALUES(28,17,'structure-parse',1,'note','the SMILES of compound A-BAD does not parse cleanly (RDKit cannot sanitize: Explicit valence for atom # 0 C, 5, is greater than permitted); it is kept as entered, but structure searches may miss it',NULL,NULL,NULL,NULL,NULL,'b3212c5687a97803589696c59551e016e44432587a10e0936f6eb232ed316b3b','2026-12-04 22:45:47.563716',NULL,NULL,NULL);
INSERT INTO "validation_finding" VALUES(29,18,'repeat-disagrees',1,'warning','ΔG‡ 60.00 kJ/mol disagrees with measurement 19 of the same compound, process, solvent and method (65.00 kJ/mol): they differ by -5.00 kJ/mol, more than their combined uncertainty allows (±1.00 kJ/mol) (and 1 other repeat(s) disagree too)',60.0,65.0,-5.0,'kJ/mol',NULL,'fd9b81ea30c5e33f83591e2e36e0ea027379f2e968fce500cd4bb9e3a0eee429','2026-12-04 22:45:47.563716',NULL,NULL,NULL);
INSERT INTO "validation_finding" VALUES(30,19,'repeat-disagrees',1,'warning','ΔG‡ 65.00 kJ/mol disagrees with measurement 18 of the same compound, process, solvent and method (60.00 kJ/mol): they differ by 5.00 kJ/mol, more than their combined uncertainty allows (±1.00 kJ/mol) (and 1 other repeat(s) disagree too)',65.0,60.0,5.0,'kJ/mol',NULL,'fc144e054d7f848a1e1f808ec3f02531e3c435f5a233f072e7accc35bfef79b1','2026-12-04 22:45:47.563716',NULL,NULL,NULL);
INSERT INTO "validation_finding" VALUES(31,20,'repeat-disagrees',1,'warning','ΔG‡ 65.00 kJ/mol disagrees with measurement 18 of the same compound, process, solvent and method (60.00 kJ/mol): they differ by 5.00 kJ/mol, more than their combined uncertainty allows (±1.00 kJ/mol) (and 1 other repeat(s) disagree too)',65.0,60.0,5.0,'kJ/mol',NULL,'e1c49d74b571c173771eb59d08c89ed452ee76f2378d5d021fece41e0d990d45','2026-12-04 22:45:47.563716',NULL,NULL,NULL);
INSERT INTO "validation_finding" VALUES(32,21,'repeat-disagrees',1,'warning','ΔG‡ 59.50 kJ/mol disagrees with measurement 19 of the same compound, process, solvent and method (65.00 kJ/mol): they differ by -5.50 kJ/mol, more than their combined uncertainty allows (±3.00 kJ/mol) (and 1 other repeat(s) disagree too)',59.5,65.0,-5.5,'kJ/mol',NULL,'ba6ef823dd571a02d3b574562eaf6d81076d72357651ab62fef90d38cd786c58','2026-12-04 22:45:47.563716',NULL,NULL,NULL);
INSERT INTO "validation_finding" VALUES(35,26,'coalescence-barrier',1,'error','ΔG‡ 55.00 kJ/mol does not match 51.74 kJ/mol recomputed from Tc 250.0 K and Δν 12 Hz (coupled AB, J = 14 Hz, k_c = π√(Δν²+6J²)/√2 = 80.71 s⁻¹): off by +3.26 kJ/mol, tolerance ±1.66 kJ/mol',55.0,5.17379677901970751446e+01,3.26203220980292485364e+00,'kJ/mol','the coupled AB pair (J = 14.0 Hz) treated with the uncoupled k_c = πΔν/√2 (gives 54.04 kJ/mol) [coupled-as-uncoupled]','59de97fcd9f1e9fa96d26a886e533675400ef76a5935667e2fd2de4cdf94c96b','2026-12-04 22:45:47.605376',NULL,NULL,NULL);
INSERT INTO "validation_finding" VALUES(36,27,'coalescence-barrier',1,'error','ΔG‡ 70.00 kJ/mol does not match 67.46 kJ/mol recomputed from Tc 320.0 K and Δν 80 Hz (unequal populations 2.50:1, Shanan-Atidi–Bar-Eli, leaving the major site, k = 64.91 s⁻¹): off by +2.54 kJ/mol, tolerance ±1.22 kJ/mol (ΔG‡ is quoted at 298.0 K; compared allowing for a small ΔS‡)',70.0,6.74610928931149800291e+01,2.53890710688502,'kJ/mol','Δν in Hz read at 200 MHz, not at the stated 400 MHz (gives 69.31 kJ/mol) [dnu-other-field]','1ac572a593fbd5cd3171a1e366029bca801e0e73d6a42d44974985467795b99a','2026-12-04 22:45:47.628256',NULL,NULL,NULL);
INSERT INTO "validation_finding" VALUES(37,28,'coalescence-barrier',1,'error','ΔG‡ 16.50 kcal/mol does not match 17.12 kcal/mol recomputed from Tc 70.0 °C (343.1 K) and Δν 40 Hz (Gutowsky–Holm, k_c = πΔν/√2 = 88.86 s⁻¹): off by -0.62 kcal/mol, tolerance ±0.24 kcal/mol',16.5,1.71234952745149229258e+01,-6.23495274514922925845e-01,'kcal/mol','k_c taken as 2πΔν instead of πΔν/√2 (gives 16.41 kcal/mol) [kc-2pi-dnu]; Δν in Hz read at 1000 MHz, not at the stated 400 MHz (gives 16.50 kcal/mol) [dnu-other-field]','bff4b9eab27ac8a65cfa4521edf0595cea37a933301aed91b2dbde2ae8405360','2026-12-04 22:45:47.650392',NULL,NULL,NULL);
INSERT INTO "validation_finding" VALUES(38,28,'solvent-liquid-range',1,'warning','Tc 70.0 °C (343.1 K) is above the boiling point of chloroform-d at 1 atm (61.0 °C (334.1 K)): heating a sample above its boiling point needs a pressure-rated sealed NMR tube used within its rating. Follow your facility''s safety rules and local regulations; these notes do not replace them. If no sealed tube was used, check the temperature, its unit, or the solvent.',70.0,61.0,9.0,'°C',NULL,'319dab33567c6e9bfcff89b31853c7ce425a7c39092accb61b06e0763da41ac8','2026-12-04 22:45:47.650392',NULL,NULL,NULL);
INSERT INTO "validation_finding" VALUES(39,29,'coalescence-barrier',1,'error','ΔG‡ 67.00 kJ/mol does not match 68.79 kJ/mol recomputed from Tc 330.0 K and Δν 40 Hz (Gutowsky–Holm, k_c = πΔν/√2 = 88.86 s⁻¹): off by -1.79 kJ/mol, tolerance ±1.00 kJ/mol',67.0,6.87919634824116315013e+01,-1.79196348241163150305e+00,'kJ/mol','k_c taken as πΔν instead of πΔν/√2 (gives 67.84 kJ/mol) [kc-pi-dnu]; Δν in Hz read at 800 MHz, not at the stated 400 MHz (gives 66.89 kJ/mol) [dnu-other-field]','eb9f901dd3a2ac9314cc863b37d5ce16ca1c4db79d32ecaecffabd8be8d9b388','2026-12-04 22:45:47.675535',NULL,NULL,NULL);
INSERT INTO "validation_finding" VALUES(40,29,'tc-in-range',1,'warning','Tc 330.0 K is above the measured range (T_max 320.0 K): coalescence cannot have been observed there; check Tc, the range, or their units',330.0,320.0,10.0,'K',NULL,'4cbf664e6b7d2a73dd65327681d2ee6f3793bd5358f6b7e1cffe78f46d30a880','2026-12-04 22:45:47.675535',NULL,NULL,NULL);
INSERT INTO "validation_finding" VALUES(41,30,'dnu-field',1,'warning','Δν 8000 Hz at 400 MHz is 20 ppm, more than the ~15 ppm a 1H shift difference can plausibly be: Hz and ppm, or the field, may be mixed up',20.0,15.0,5.0,'ppm',NULL,'10361d499ccdddc849944cded00acb99dc0076617a7800136fa3b6e47a82e8f9','2026-12-04 22:45:47.687763','curator','2026-12-04 22:45:48.266319','known');
INSERT INTO "validation_finding" VALUES(43,32,'dnu-field',1,'warning','spectrometer frequency 0.04 MHz is outside 40–1300 MHz: not a 1H frequency of an NMR magnet; check the field and its unit',0.04,NULL,NULL,'MHz',NULL,'568a35d39d7b172ac858a274379613b7f285462aaa875194dec908ce27797336','2026-12-04 22:45:47.716706','curator','2026-12-04 22:45:48.266538','known');
INSERT INTO "validation_finding" VALUES(47,35,'dg-from-dh-ds',1,'error','ΔG‡ 17.00 kcal/mol at 300.0 K does not match ΔH‡ − TΔS‡ = 15.50 kcal/mol (ΔH‡ 14.00 kcal/mol, ΔS‡ -20.9 J/(mol·K)): off by +1.50 kcal/mol, tolerance ±0.24 kcal/mol',17.0,15.5,1.5,'kcal/mol',NULL,'814145bde4aac79bfbd322e2dacb92eae138d765ed801296eecc76c8f7b0420e','2026-12-04 22:45:47.765721',NULL,NULL,NULL);
INSERT INTO "validation_finding" VALUES(48,36,'temperature-range-order',1,'error','T_min 30.0 °C (303.1 K) is above T_max -20.0 °C (253.1 K): the two are probably swapped or one has the wrong unit',30.0,-20.0,50.0,'°C',NULL,'b527f7218be5b40bac6893d47cd1582a3d37c9e7dc8a607ebb3bb9e2853bfbcf','2026-12-04 22:45:47.776966','curator','2026-12-04 22:45:48.266849','known');
INSERT INTO "validation_finding" VALUES(49,37,'solvent-liquid-range',1,'warning','T_min 0.0 °C (273.1 K) is below the melting point of dimethyl sulfoxide-d6 (18.5 °C (291.6 K)): the sample would be frozen; check the temperature, its unit, or the solvent',0.0,18.5,-18.5,'°C',NULL,'b2f249218dbf9091cffefba9927df9dd910be81b97428db51a3019acdea1a941','2026-12-04 22:45:47.792934',NULL,NULL,NULL);
INSERT INTO "validation_finding" VALUES(50,38,'barrier-method-range',1,'warning','ΔG‡ 3.50 kcal/mol is below the range dynamic NMR can measure (about 5–24 kcal/mol) for a lineshape measurement: check the value, its unit, or the method',3.5,4.78011472275334625692e+00,-1.28011472275334603487e+00,'kcal/mol',NULL,'2cd43ee69adae4e9d5a77135d2a8ff0a527c1bc8a5b592bd3fa4158b7c55b2ef','2026-12-04 22:45:47.808036',NULL,NULL,NULL);
INSERT INTO "validation_finding" VALUES(51,39,'temperature-positive',1,'error','T_min is 0.00 K: a temperature must be above absolute zero',0.0,NULL,NULL,'K',NULL,'142efbb8da491916fbce9e13be782cefa096daa73f105b172bb3c86634e5e3c8','2026-12-04 22:45:47.821093',NULL,NULL,NULL);
INSERT INTO "validation_finding" VALUES(52,39,'solvent-liquid-range',1,'warning','T_min 0.0 K is below the melting point of toluene-d8 (178.2 K): the sample would be frozen; check the temperature, its unit, or the solvent',0.0,178.15,-178.15,'K',NULL,'b00addf66ab36ec3110d035840ebe58095fec6a1cc644b692d1ec7fa917c4da1','2026-12-04 22:45:47.821093',NULL,NULL,NULL);
INSERT INTO "validation_finding" VALUES(53,40,'structure-parse',1,'note','the SMILES of compound B-BAD does not parse cleanly (RDKit cannot sanitize: Explicit valence for atom # 0 C, 5, is greater than permitted); it is kept as entered, but structure searches may miss it',NULL,NULL,NULL,NULL,NULL,'87402d5b44cbac735ae3da6b95872c53f75471cbf37b0bfeea9f0ad00c94611f','2026-12-04 22:45:47.838048',NULL,NULL,NULL);
INSERT INTO "validation_finding" VALUES(56,44,'repeat-disagrees',1,'warning','ΔG‡ 59.50 kJ/mol disagrees with measurement 42 of the same compound, process, solvent and method (65.00 kJ/mol): they differ by -5.50 kJ/mol, more than their combined uncertainty allows (±3.00 kJ/mol) (and 1 other repeat(s) disagree too)',59.5,65.0,-5.5,'kJ/mol',NULL,'397a92200c43b381a3e147b86c8dbe24e8e2d0710e2756946998f95c15091782','2026-12-04 22:45:47.906378',NULL,NULL,NULL);
INSERT INTO "validation_finding" VALUES(57,46,'barrier-method-range',1,'warning','ΔG‡ 5.00 kJ/mol is below the range dynamic NMR can measure (about 20–100 kJ/mol) for a lineshape measurement: check the value, its unit, or the method',5.0,20.0,-15.0,'kJ/mol',NULL,'f4722974703323d01d9774dca3a78b76c780011c5d01e26cbefdc49cc35b533f','2026-12-04 22:45:47.928809',NULL,NULL,NULL);
INSERT INTO "validation_finding" VALUES(58,24,'temperature-positive',1,'error','a rate point is at -5.00 K: a temperature must be above absolute zero',-5.0,NULL,NULL,'K',NULL,'60e75d0cc0b49f2f254200e8ee70e988ca328f88035ba2521a87edc7c0acab3c','2026-12-04 22:45:47.948230',NULL,NULL,NULL);
INSERT INTO "validation_finding" VALUES(59,24,'solvent-liquid-range',1,'warning','a rate point -5.0 K is below the melting point of toluene-d8 (178.2 K): the sample would be frozen; check the temperature, its unit, or the solvent',-5.0,178.15,-183.15,'K',NULL,'ed06b1743e44c64201b2406b16968d87b677aee9ee598dda619d47601bff4513','2026-12-04 22:45:47.948230',NULL,NULL,NULL);
INSERT INTO "validation_finding" VALUES(60,25,'coalescence-barrier',1,'error','ΔG‡ 258.32 kJ/mol does not match 61.78 kJ/mol recomputed from Tc 27.0 °C (300.1 K) and Δν 50 Hz (Gutowsky–Holm, k_c = πΔν/√2 = 111.1 s⁻¹): off by +196.54 kJ/mol, tolerance ±1.00 kJ/mol',2.58320160000000043965e+02,6.17759365171721128726e+01,1.96544223482827931093e+02,'kJ/mol','a kJ/mol value labelled kcal/mol (gives 258.47 kJ/mol) [kj-as-kcal]','32aecedd9a98c41936ecce6ccc2172afa1f5c5424b82a021e741f29da22ee9df','2026-12-04 22:45:47.963694',NULL,NULL,NULL);
INSERT INTO "validation_finding" VALUES(61,25,'barrier-method-range',1,'warning','ΔG‡ 258.32 kJ/mol is above the range dynamic NMR can measure (about 20–100 kJ/mol) for a coalescence measurement: check the value, its unit, or the method',2.58320160000000043965e+02,100.0,1.58320160000000043965e+02,'kJ/mol',NULL,'47276fc12c856e1896edc5bc37dc1da98006862415bbdc068c9f3c981f08981d','2026-12-04 22:45:47.963694',NULL,NULL,NULL);
INSERT INTO "validation_finding" VALUES(62,31,'coalescence-barrier',1,'error','ΔG‡ 60.00 kJ/mol does not match 55.55 kJ/mol recomputed from Tc 300.0 K and Δν 600 Hz (Gutowsky–Holm, k_c = πΔν/√2 = 1333 s⁻¹): off by +4.45 kJ/mol, tolerance ±1.00 kJ/mol',60.0,5.55456180926964364612e+01,4.45438190730356353697e+00,'kJ/mol',NULL,'c15233542e776dd8fa1600b6413aa1436db3a81bf873793874d9b69ccbd18a5f','2026-12-04 22:45:48.065220',NULL,NULL,NULL);
INSERT INTO "validation_finding" VALUES(63,31,'dnu-ppm-nucleus',1,'warning','Δν 1.5 ppm of 13C was converted with the 1H frequency (400 MHz) to 600 Hz; 13C is observed at 100.6 MHz on that magnet, so Δν is 150.9 Hz and the barrier recomputed from it changes; re-enter Δν in Hz',600.0,1.50870120000000014211e+02,4.49129879999999957361e+02,'Hz',NULL,'6ead7a9ddfa17e8d627533448ace1845b4a08413301a8aa8a81a927adb65c74e','2026-12-04 22:45:48.065220',NULL,NULL,NULL);
INSERT INTO "validation_finding" VALUES(64,33,'activation-refit',1,'warning','ΔH‡ 65.00 kJ/mol does not match 55.00 kJ/mol from an Eyring refit of the 5 stored rate points: off by +10.00 kJ/mol, tolerance ±2.83 kJ/mol',65.0,5.50000037986631511426e+01,9.99999620133684885558e+00,'kJ/mol',NULL,'b72457d6d1e85fb127444b9137bfd14a459ae1e2e9c67ad1f9298cfa924d858f','2026-12-04 22:45:48.098429','curator','2026-12-04 22:45:48.266643','known');
INSERT INTO "validation_finding" VALUES(65,33,'activation-refit',1,'warning','ΔS‡ 20.00 J/(mol·K) does not match -10.00 J/(mol·K) from an Eyring refit of the 5 stored rate points: off by +30.00 J/(mol·K), tolerance ±8.71 J/(mol·K)',20.0,-9.99998793631894677957e+00,2.99999879363189450023e+01,'J/(mol·K)',NULL,'36a81c6486e1ac69ceb7ee8b28b5f8ead01c9ae28d6cd8cf43c2f2bb9665839e','2026-12-04 22:45:48.098429','curator','2026-12-04 22:45:48.266741','known');
INSERT INTO "validation_finding" VALUES(66,34,'ea-from-dh',1,'warning','Ea 60.00 kJ/mol does not match ΔH‡ + RT = 62.49 kJ/mol at 300.0 K (middle of the stated range): off by -2.49 kJ/mol, tolerance ±1.08 kJ/mol',60.0,6.24943387854459757573e+01,-2.4943387854459757591e+00,'kJ/mol','Ea and ΔH‡ given the same value (the RT term left out)','d1c5cdd5491d0c0951433247469a4397a43863ec056218549b2d165b55781ef9','2026-12-04 22:45:48.108355',NULL,NULL,NULL);
INSERT INTO "validation_finding" VALUES(67,34,'structure-parse',1,'note','the SMILES of compound B-EA does not parse cleanly (hand-edited); it is kept as entered, but structure searches may miss it',NULL,NULL,NULL,NULL,NULL,'eedd0084865e065e49513c187739170f3b1f715d7e34864dc29dd0cc4e9ba718','2026-12-04 22:45:48.108355',NULL,NULL,NULL);
INSERT INTO "validation_finding" VALUES(68,41,'repeat-disagrees',1,'warning','ΔG‡ 60.00 kJ/mol disagrees with measurement 42 of the same compound, process, solvent and method (65.00 kJ/mol): they differ by -5.00 kJ/mol, more than their combined uncertainty allows (±1.00 kJ/mol) (and 1 other repeat(s) disagree too)',60.0,65.0,-5.0,'kJ/mol',NULL,'6a2eba4fd1885f038f0d52f937852bf6ce7590c226d1f2c9b32935e75cf0f99b','2026-12-04 22:45:48.222492',NULL,NULL,NULL);
INSERT INTO "validation_finding" VALUES(69,42,'repeat-disagrees',1,'warning','ΔG‡ 65.00 kJ/mol disagrees with measurement 41 of the same compound, process, solvent and method (60.00 kJ/mol): they differ by 5.00 kJ/mol, more than their combined uncertainty allows (±1.00 kJ/mol) (and 1 other repeat(s) disagree too)',65.0,60.0,5.0,'kJ/mol',NULL,'9feeeb00472fed30b94b48b564ce5c92836c7b46e35ddd4cda441230cd6a635b','2026-12-04 22:45:48.234264',NULL,NULL,NULL);
INSERT INTO "validation_finding" VALUES(70,43,'repeat-disagrees',1,'warning','ΔG‡ 65.00 kJ/mol disagrees with measurement 41 of the same compound, process, solvent and method (60.00 kJ/mol): they differ by 5.00 kJ/mol, more than their combined uncertainty allows (±1.00 kJ/mol) (and 1 other repeat(s) disagree too)',65.0,60.0,5.0,'kJ/mol',NULL,'bd02a8f8bc3d5742ead1585c2b02c3d501f914b112f7348deced5810e1d5a71d','2026-12-04 22:45:48.246226',NULL,NULL,NULL);
CREATE INDEX ix_import_batch_sha256 ON import_batch (sha256);
CREATE INDEX ix_process_compound_id ON process (compound_id);
CREATE INDEX ix_revision_entity ON revision (entity, entity_id);
CREATE INDEX ix_measurement_compound_id ON measurement (compound_id);
CREATE INDEX ix_measurement_dg_kj_mol ON measurement (dg_kj_mol);
CREATE INDEX ix_measurement_match_key ON measurement (compound_id, process_id, method, solvent_text);
CREATE INDEX ix_measurement_status ON measurement (status);
CREATE INDEX ix_coalescence_measurement_id ON coalescence (measurement_id);
CREATE INDEX ix_rate_point_measurement_id ON rate_point (measurement_id);
CREATE INDEX ix_validation_finding_measurement_id ON validation_finding (measurement_id);
CREATE INDEX ix_validation_finding_rule ON validation_finding (measurement_id, rule_id);
CREATE TRIGGER trg_compound_structure_update AFTER UPDATE OF smiles_canonical, mol_binary, pattern_fp, structure_ok ON compound FOR EACH ROW BEGIN UPDATE change_counter SET n = n + 1 WHERE name = 'structure'; END;
CREATE TRIGGER trg_compound_structure_delete AFTER DELETE ON compound FOR EACH ROW BEGIN UPDATE change_counter SET n = n + 1 WHERE name = 'structure'; END;
CREATE TRIGGER trg_compound_listing_update AFTER UPDATE ON compound FOR EACH ROW BEGIN UPDATE change_counter SET n = n + 1 WHERE name = 'listing'; END;
CREATE TRIGGER trg_compound_listing_delete AFTER DELETE ON compound FOR EACH ROW BEGIN UPDATE change_counter SET n = n + 1 WHERE name = 'listing'; END;
CREATE TRIGGER trg_measurement_listing_update AFTER UPDATE ON measurement FOR EACH ROW BEGIN UPDATE change_counter SET n = n + 1 WHERE name = 'listing'; END;
CREATE TRIGGER trg_measurement_listing_delete AFTER DELETE ON measurement FOR EACH ROW BEGIN UPDATE change_counter SET n = n + 1 WHERE name = 'listing'; END;
CREATE TRIGGER trg_process_listing_update AFTER UPDATE ON process FOR EACH ROW BEGIN UPDATE change_counter SET n = n + 1 WHERE name = 'listing'; END;
CREATE TRIGGER trg_process_listing_delete AFTER DELETE ON process FOR EACH ROW BEGIN UPDATE change_counter SET n = n + 1 WHERE name = 'listing'; END;
CREATE TRIGGER trg_solvent_vocabulary_insert AFTER INSERT ON solvent FOR EACH ROW BEGIN UPDATE change_counter SET n = n + 1 WHERE name = 'vocabulary'; END;
CREATE TRIGGER trg_solvent_vocabulary_update AFTER UPDATE ON solvent FOR EACH ROW BEGIN UPDATE change_counter SET n = n + 1 WHERE name = 'vocabulary'; END;
CREATE TRIGGER trg_solvent_vocabulary_delete AFTER DELETE ON solvent FOR EACH ROW BEGIN UPDATE change_counter SET n = n + 1 WHERE name = 'vocabulary'; END;
CREATE TRIGGER trg_process_kind_vocabulary_insert AFTER INSERT ON process_kind FOR EACH ROW BEGIN UPDATE change_counter SET n = n + 1 WHERE name = 'vocabulary'; END;
CREATE TRIGGER trg_process_kind_vocabulary_update AFTER UPDATE ON process_kind FOR EACH ROW BEGIN UPDATE change_counter SET n = n + 1 WHERE name = 'vocabulary'; END;
CREATE TRIGGER trg_process_kind_vocabulary_delete AFTER DELETE ON process_kind FOR EACH ROW BEGIN UPDATE change_counter SET n = n + 1 WHERE name = 'vocabulary'; END;
COMMIT;
