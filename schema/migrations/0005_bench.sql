CREATE TYPE "public"."reading_method" AS ENUM('in-circuit', 'lead-lifted', 'out-of-circuit');--> statement-breakpoint
CREATE TYPE "public"."reading_state" AS ENUM('value', 'open', 'over-range', 'short', 'climbing', 'unstable', 'no-access');--> statement-breakpoint
CREATE TYPE "public"."survey_purpose" AS ENUM('intake', 'after-repair', 'periodic', 'assignment');--> statement-breakpoint
CREATE TYPE "public"."survey_state" AS ENUM('draft', 'complete', 'submitted', 'returned', 'accepted');--> statement-breakpoint
CREATE TABLE "bring_up_entries" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "bring_up_entries_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"set_id" integer NOT NULL,
	"step" text NOT NULL,
	"setting" text DEFAULT '' NOT NULL,
	"mains_volts" double precision,
	"current_amps" double precision,
	"b_plus" jsonb DEFAULT '[]'::jsonb NOT NULL,
	"observations" text[] DEFAULT '{}'::text[] NOT NULL,
	"note" text DEFAULT '' NOT NULL,
	"recorded_by" integer,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "gate_signatures" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "gate_signatures_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"set_id" integer NOT NULL,
	"item_key" text NOT NULL,
	"action" text NOT NULL,
	"note" text DEFAULT '' NOT NULL,
	"signed_by" integer,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "lifted_leads" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "lifted_leads_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"set_id" integer NOT NULL,
	"survey_id" integer,
	"component_key" text NOT NULL,
	"component_ref" text NOT NULL,
	"end" smallint NOT NULL,
	"node" text NOT NULL,
	"prompted_by_reading_id" bigint,
	"lifted_by" integer,
	"lifted_at" timestamp with time zone DEFAULT now() NOT NULL,
	"resoldered_by" integer,
	"resoldered_at" timestamp with time zone,
	"recheck_reading_id" bigint,
	"note" text DEFAULT '' NOT NULL
);
--> statement-breakpoint
CREATE TABLE "meter_profiles" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "meter_profiles_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"owner_id" integer NOT NULL,
	"name" text NOT NULL,
	"profile" jsonb NOT NULL,
	"check_kind" text DEFAULT 'check' NOT NULL,
	"check_date" date,
	"check_resistor_ohms" double precision,
	"check_resistor_tolerance_pct" double precision,
	"archived" boolean DEFAULT false NOT NULL,
	"version" integer DEFAULT 1 NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "parts_record" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "parts_record_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"set_id" integer NOT NULL,
	"component_key" text NOT NULL,
	"component_ref" text NOT NULL,
	"action" text NOT NULL,
	"new_part" jsonb,
	"reading_id" bigint,
	"reason" text DEFAULT '' NOT NULL,
	"note" text DEFAULT '' NOT NULL,
	"recorded_by" integer,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "provenance_labels" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "provenance_labels_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"set_id" integer NOT NULL,
	"token_hash" text NOT NULL,
	"token" text,
	"created_by" integer,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"revoked_at" timestamp with time zone
);
--> statement-breakpoint
CREATE TABLE "readings" (
	"id" bigint PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "readings_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 9223372036854775807 START WITH 1 CACHE 1),
	"survey_id" integer NOT NULL,
	"test_point_key" text NOT NULL,
	"client_key" text NOT NULL,
	"follows_reading_id" bigint,
	"text" text DEFAULT '' NOT NULL,
	"state" "reading_state" NOT NULL,
	"ohms" double precision,
	"method" "reading_method" DEFAULT 'in-circuit' NOT NULL,
	"lifted_end" smallint,
	"range_index" smallint,
	"note" text DEFAULT '' NOT NULL,
	"prediction" text,
	"entered_by" integer,
	"taken_at" timestamp with time zone DEFAULT now() NOT NULL,
	"version" integer DEFAULT 1 NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "replacement_marks" (
	"set_id" integer NOT NULL,
	"component_key" text NOT NULL,
	"ordered_at" timestamp with time zone,
	"received_at" timestamp with time zone,
	"updated_by" integer,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "set_files" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "set_files_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"set_id" integer NOT NULL,
	"reading_id" bigint,
	"storage_key" text NOT NULL,
	"thumbnail_key" text,
	"original_name" text NOT NULL,
	"mime_type" text NOT NULL,
	"bytes" integer NOT NULL,
	"caption" text DEFAULT '' NOT NULL,
	"uploaded_by" integer,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "set_shares" (
	"set_id" integer NOT NULL,
	"user_id" integer NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "sets" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "sets_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"owner_id" integer NOT NULL,
	"template_id" integer NOT NULL,
	"label" text NOT NULL,
	"accession_number" text DEFAULT '' NOT NULL,
	"customer" text DEFAULT '' NOT NULL,
	"job_status" text DEFAULT 'intake' NOT NULL,
	"serial" text DEFAULT '' NOT NULL,
	"restoration_level" text DEFAULT 'repair' NOT NULL,
	"condition" text DEFAULT '' NOT NULL,
	"complaint" text DEFAULT '' NOT NULL,
	"intake_notes" text DEFAULT '' NOT NULL,
	"deviations" jsonb DEFAULT '[]'::jsonb NOT NULL,
	"first_power_at" timestamp with time zone,
	"first_power_by" integer,
	"version" integer DEFAULT 1 NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "survey_amendments" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "survey_amendments_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"survey_id" integer NOT NULL,
	"reading_id" bigint,
	"reason" text NOT NULL,
	"change" jsonb NOT NULL,
	"amended_by" integer,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "surveys" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "surveys_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"set_id" integer NOT NULL,
	"template_version_id" integer NOT NULL,
	"version_number" integer NOT NULL,
	"purpose" "survey_purpose" NOT NULL,
	"state" "survey_state" DEFAULT 'draft' NOT NULL,
	"meter_profile_id" integer,
	"meter" jsonb,
	"rule" jsonb NOT NULL,
	"conditions" jsonb NOT NULL,
	"meter_check" jsonb,
	"carried_from_survey_id" integer,
	"started_by" integer,
	"completed_at" timestamp with time zone,
	"completed_by" integer,
	"joint_checks" jsonb DEFAULT '{}'::jsonb NOT NULL,
	"assignment_id" integer,
	"version" integer DEFAULT 1 NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "tube_records" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "tube_records_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"set_id" integer NOT NULL,
	"socket_key" text NOT NULL,
	"status" text NOT NULL,
	"found_type" text DEFAULT '' NOT NULL,
	"test_result" text DEFAULT '' NOT NULL,
	"note" text DEFAULT '' NOT NULL,
	"recorded_by" integer,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "bring_up_entries" ADD CONSTRAINT "bring_up_entries_set_id_sets_id_fk" FOREIGN KEY ("set_id") REFERENCES "public"."sets"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "bring_up_entries" ADD CONSTRAINT "bring_up_entries_recorded_by_users_id_fk" FOREIGN KEY ("recorded_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "gate_signatures" ADD CONSTRAINT "gate_signatures_set_id_sets_id_fk" FOREIGN KEY ("set_id") REFERENCES "public"."sets"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "gate_signatures" ADD CONSTRAINT "gate_signatures_signed_by_users_id_fk" FOREIGN KEY ("signed_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "lifted_leads" ADD CONSTRAINT "lifted_leads_set_id_sets_id_fk" FOREIGN KEY ("set_id") REFERENCES "public"."sets"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "lifted_leads" ADD CONSTRAINT "lifted_leads_survey_id_surveys_id_fk" FOREIGN KEY ("survey_id") REFERENCES "public"."surveys"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "lifted_leads" ADD CONSTRAINT "lifted_leads_lifted_by_users_id_fk" FOREIGN KEY ("lifted_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "lifted_leads" ADD CONSTRAINT "lifted_leads_resoldered_by_users_id_fk" FOREIGN KEY ("resoldered_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "meter_profiles" ADD CONSTRAINT "meter_profiles_owner_id_users_id_fk" FOREIGN KEY ("owner_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "parts_record" ADD CONSTRAINT "parts_record_set_id_sets_id_fk" FOREIGN KEY ("set_id") REFERENCES "public"."sets"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "parts_record" ADD CONSTRAINT "parts_record_recorded_by_users_id_fk" FOREIGN KEY ("recorded_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "provenance_labels" ADD CONSTRAINT "provenance_labels_set_id_sets_id_fk" FOREIGN KEY ("set_id") REFERENCES "public"."sets"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "provenance_labels" ADD CONSTRAINT "provenance_labels_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "readings" ADD CONSTRAINT "readings_survey_id_surveys_id_fk" FOREIGN KEY ("survey_id") REFERENCES "public"."surveys"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "readings" ADD CONSTRAINT "readings_entered_by_users_id_fk" FOREIGN KEY ("entered_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "replacement_marks" ADD CONSTRAINT "replacement_marks_set_id_sets_id_fk" FOREIGN KEY ("set_id") REFERENCES "public"."sets"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "replacement_marks" ADD CONSTRAINT "replacement_marks_updated_by_users_id_fk" FOREIGN KEY ("updated_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "set_files" ADD CONSTRAINT "set_files_set_id_sets_id_fk" FOREIGN KEY ("set_id") REFERENCES "public"."sets"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "set_files" ADD CONSTRAINT "set_files_uploaded_by_users_id_fk" FOREIGN KEY ("uploaded_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "set_shares" ADD CONSTRAINT "set_shares_set_id_sets_id_fk" FOREIGN KEY ("set_id") REFERENCES "public"."sets"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "set_shares" ADD CONSTRAINT "set_shares_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "sets" ADD CONSTRAINT "sets_owner_id_users_id_fk" FOREIGN KEY ("owner_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "sets" ADD CONSTRAINT "sets_template_id_chassis_templates_id_fk" FOREIGN KEY ("template_id") REFERENCES "public"."chassis_templates"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "sets" ADD CONSTRAINT "sets_first_power_by_users_id_fk" FOREIGN KEY ("first_power_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "survey_amendments" ADD CONSTRAINT "survey_amendments_survey_id_surveys_id_fk" FOREIGN KEY ("survey_id") REFERENCES "public"."surveys"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "survey_amendments" ADD CONSTRAINT "survey_amendments_amended_by_users_id_fk" FOREIGN KEY ("amended_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "surveys" ADD CONSTRAINT "surveys_set_id_sets_id_fk" FOREIGN KEY ("set_id") REFERENCES "public"."sets"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "surveys" ADD CONSTRAINT "surveys_template_version_id_template_versions_id_fk" FOREIGN KEY ("template_version_id") REFERENCES "public"."template_versions"("id") ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "surveys" ADD CONSTRAINT "surveys_meter_profile_id_meter_profiles_id_fk" FOREIGN KEY ("meter_profile_id") REFERENCES "public"."meter_profiles"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "surveys" ADD CONSTRAINT "surveys_started_by_users_id_fk" FOREIGN KEY ("started_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "surveys" ADD CONSTRAINT "surveys_completed_by_users_id_fk" FOREIGN KEY ("completed_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "tube_records" ADD CONSTRAINT "tube_records_set_id_sets_id_fk" FOREIGN KEY ("set_id") REFERENCES "public"."sets"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "tube_records" ADD CONSTRAINT "tube_records_recorded_by_users_id_fk" FOREIGN KEY ("recorded_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "bring_up_entries_set_idx" ON "bring_up_entries" USING btree ("set_id","id");--> statement-breakpoint
CREATE INDEX "gate_signatures_set_idx" ON "gate_signatures" USING btree ("set_id","item_key","id");--> statement-breakpoint
CREATE INDEX "lifted_leads_set_idx" ON "lifted_leads" USING btree ("set_id");--> statement-breakpoint
CREATE INDEX "lifted_leads_open_idx" ON "lifted_leads" USING btree ("set_id") WHERE "lifted_leads"."resoldered_at" is null;--> statement-breakpoint
CREATE INDEX "meter_profiles_owner_idx" ON "meter_profiles" USING btree ("owner_id");--> statement-breakpoint
CREATE INDEX "parts_record_set_idx" ON "parts_record" USING btree ("set_id","component_key");--> statement-breakpoint
CREATE UNIQUE INDEX "provenance_labels_token_idx" ON "provenance_labels" USING btree ("token_hash");--> statement-breakpoint
CREATE INDEX "provenance_labels_set_idx" ON "provenance_labels" USING btree ("set_id");--> statement-breakpoint
CREATE UNIQUE INDEX "readings_client_key_idx" ON "readings" USING btree ("survey_id","client_key");--> statement-breakpoint
CREATE INDEX "readings_survey_idx" ON "readings" USING btree ("survey_id","id");--> statement-breakpoint
CREATE UNIQUE INDEX "replacement_marks_pk_idx" ON "replacement_marks" USING btree ("set_id","component_key");--> statement-breakpoint
CREATE INDEX "set_files_set_idx" ON "set_files" USING btree ("set_id");--> statement-breakpoint
CREATE UNIQUE INDEX "set_shares_pk_idx" ON "set_shares" USING btree ("set_id","user_id");--> statement-breakpoint
CREATE INDEX "set_shares_user_idx" ON "set_shares" USING btree ("user_id");--> statement-breakpoint
CREATE INDEX "sets_owner_idx" ON "sets" USING btree ("owner_id","updated_at" DESC NULLS LAST);--> statement-breakpoint
CREATE INDEX "sets_template_idx" ON "sets" USING btree ("template_id");--> statement-breakpoint
CREATE INDEX "survey_amendments_survey_idx" ON "survey_amendments" USING btree ("survey_id");--> statement-breakpoint
CREATE INDEX "surveys_set_idx" ON "surveys" USING btree ("set_id","created_at");--> statement-breakpoint
CREATE INDEX "surveys_version_idx" ON "surveys" USING btree ("template_version_id");--> statement-breakpoint
CREATE UNIQUE INDEX "tube_records_socket_idx" ON "tube_records" USING btree ("set_id","socket_key");