CREATE TYPE "public"."chassis_kind" AS ENUM('table-radio', 'console', 'portable', 'communications-receiver', 'amplifier', 'other');--> statement-breakpoint
CREATE TYPE "public"."correction_state" AS ENUM('open', 'accepted', 'declined');--> statement-breakpoint
CREATE TYPE "public"."correction_target" AS ENUM('component', 'test-point');--> statement-breakpoint
CREATE TYPE "public"."heating" AS ENUM('indirect', 'direct');--> statement-breakpoint
CREATE TYPE "public"."power_arrangement" AS ENUM('transformer', 'autotransformer', 'ac-dc', 'battery');--> statement-breakpoint
CREATE TYPE "public"."template_version_state" AS ENUM('draft', 'published', 'retired');--> statement-breakpoint
CREATE TYPE "public"."template_visibility" AS ENUM('private', 'shared', 'public');--> statement-breakpoint
CREATE TABLE "chassis_templates" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "chassis_templates_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"owner_id" integer NOT NULL,
	"maker" text NOT NULL,
	"model" text NOT NULL,
	"chassis_number" text DEFAULT '' NOT NULL,
	"kind" "chassis_kind" NOT NULL,
	"power" "power_arrangement" NOT NULL,
	"year_from" integer,
	"year_to" integer,
	"visibility" "template_visibility" DEFAULT 'private' NOT NULL,
	"revision" integer DEFAULT 1 NOT NULL,
	"copied_from_template_id" integer,
	"copied_from_version_id" integer,
	"copied_from_version_number" integer,
	"origin_author_name" text,
	"search_text" text DEFAULT '' NOT NULL,
	"tube_types" text[] DEFAULT '{}'::text[] NOT NULL,
	"stage_count" integer DEFAULT 0 NOT NULL,
	"test_point_count" integer DEFAULT 0 NOT NULL,
	"component_count" integer DEFAULT 0 NOT NULL,
	"latest_published_number" integer,
	"version_count" integer DEFAULT 0 NOT NULL,
	"survey_count" integer DEFAULT 0 NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "template_corrections" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "template_corrections_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"template_id" integer NOT NULL,
	"version_id" integer,
	"version_number" integer NOT NULL,
	"target_kind" "correction_target" NOT NULL,
	"target_key" text NOT NULL,
	"change" jsonb NOT NULL,
	"note" text NOT NULL,
	"author_id" integer,
	"state" "correction_state" DEFAULT 'open' NOT NULL,
	"decision_note" text,
	"decided_at" timestamp with time zone,
	"decided_by" integer,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "template_files" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "template_files_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"template_id" integer NOT NULL,
	"stage_key" text,
	"storage_key" text NOT NULL,
	"original_name" text NOT NULL,
	"media_type" text NOT NULL,
	"bytes" integer NOT NULL,
	"width" integer,
	"height" integer,
	"created_by" integer,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "template_shares" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "template_shares_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"template_id" integer NOT NULL,
	"user_id" integer,
	"class_id" integer,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "template_versions" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "template_versions_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"template_id" integer NOT NULL,
	"state" "template_version_state" NOT NULL,
	"number" integer,
	"content" jsonb NOT NULL,
	"revision" integer NOT NULL,
	"changelog" text,
	"published_at" timestamp with time zone,
	"published_by" integer,
	"retired_at" timestamp with time zone,
	"retired_by" integer,
	"retired_reason" text,
	"tube_types" text[] DEFAULT '{}'::text[] NOT NULL,
	"stage_count" integer DEFAULT 0 NOT NULL,
	"test_point_count" integer DEFAULT 0 NOT NULL,
	"component_count" integer DEFAULT 0 NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "tube_types" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "tube_types_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"designation" text NOT NULL,
	"base" text NOT NULL,
	"heating" "heating" NOT NULL,
	"heater_volts" double precision NOT NULL,
	"heater_amps" double precision NOT NULL,
	"pins" jsonb NOT NULL,
	"ties" jsonb DEFAULT '[]'::jsonb NOT NULL,
	"notes" text DEFAULT '' NOT NULL,
	"created_by" integer,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "chassis_templates" ADD CONSTRAINT "chassis_templates_owner_id_users_id_fk" FOREIGN KEY ("owner_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "chassis_templates" ADD CONSTRAINT "chassis_templates_copied_from_template_id_chassis_templates_id_fk" FOREIGN KEY ("copied_from_template_id") REFERENCES "public"."chassis_templates"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "chassis_templates" ADD CONSTRAINT "chassis_templates_copied_from_version_id_template_versions_id_fk" FOREIGN KEY ("copied_from_version_id") REFERENCES "public"."template_versions"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "template_corrections" ADD CONSTRAINT "template_corrections_template_id_chassis_templates_id_fk" FOREIGN KEY ("template_id") REFERENCES "public"."chassis_templates"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "template_corrections" ADD CONSTRAINT "template_corrections_version_id_template_versions_id_fk" FOREIGN KEY ("version_id") REFERENCES "public"."template_versions"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "template_corrections" ADD CONSTRAINT "template_corrections_author_id_users_id_fk" FOREIGN KEY ("author_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "template_corrections" ADD CONSTRAINT "template_corrections_decided_by_users_id_fk" FOREIGN KEY ("decided_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "template_files" ADD CONSTRAINT "template_files_template_id_chassis_templates_id_fk" FOREIGN KEY ("template_id") REFERENCES "public"."chassis_templates"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "template_files" ADD CONSTRAINT "template_files_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "template_shares" ADD CONSTRAINT "template_shares_template_id_chassis_templates_id_fk" FOREIGN KEY ("template_id") REFERENCES "public"."chassis_templates"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "template_shares" ADD CONSTRAINT "template_shares_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "template_versions" ADD CONSTRAINT "template_versions_template_id_chassis_templates_id_fk" FOREIGN KEY ("template_id") REFERENCES "public"."chassis_templates"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "template_versions" ADD CONSTRAINT "template_versions_published_by_users_id_fk" FOREIGN KEY ("published_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "template_versions" ADD CONSTRAINT "template_versions_retired_by_users_id_fk" FOREIGN KEY ("retired_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "tube_types" ADD CONSTRAINT "tube_types_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "chassis_templates_owner_idx" ON "chassis_templates" USING btree ("owner_id");--> statement-breakpoint
CREATE INDEX "chassis_templates_search_trgm_idx" ON "chassis_templates" USING gin ("search_text" gin_trgm_ops);--> statement-breakpoint
CREATE INDEX "chassis_templates_maker_trgm_idx" ON "chassis_templates" USING gin ("maker" gin_trgm_ops);--> statement-breakpoint
CREATE INDEX "chassis_templates_model_trgm_idx" ON "chassis_templates" USING gin ("model" gin_trgm_ops);--> statement-breakpoint
CREATE INDEX "chassis_templates_chassis_trgm_idx" ON "chassis_templates" USING gin ("chassis_number" gin_trgm_ops);--> statement-breakpoint
CREATE INDEX "chassis_templates_tube_types_idx" ON "chassis_templates" USING gin ("tube_types");--> statement-breakpoint
CREATE INDEX "chassis_templates_use_idx" ON "chassis_templates" USING btree ("survey_count" DESC NULLS LAST,"id" DESC NULLS LAST);--> statement-breakpoint
CREATE INDEX "chassis_templates_updated_idx" ON "chassis_templates" USING btree ("updated_at" DESC NULLS LAST,"id" DESC NULLS LAST);--> statement-breakpoint
CREATE INDEX "chassis_templates_kind_idx" ON "chassis_templates" USING btree ("kind");--> statement-breakpoint
CREATE INDEX "template_corrections_template_idx" ON "template_corrections" USING btree ("template_id","state");--> statement-breakpoint
CREATE INDEX "template_corrections_author_idx" ON "template_corrections" USING btree ("author_id");--> statement-breakpoint
CREATE INDEX "template_files_template_idx" ON "template_files" USING btree ("template_id");--> statement-breakpoint
CREATE UNIQUE INDEX "template_files_storage_idx" ON "template_files" USING btree ("storage_key");--> statement-breakpoint
CREATE UNIQUE INDEX "template_shares_user_idx" ON "template_shares" USING btree ("template_id","user_id");--> statement-breakpoint
CREATE INDEX "template_shares_by_user_idx" ON "template_shares" USING btree ("user_id");--> statement-breakpoint
CREATE UNIQUE INDEX "template_versions_number_idx" ON "template_versions" USING btree ("template_id","number");--> statement-breakpoint
CREATE UNIQUE INDEX "template_versions_one_draft_idx" ON "template_versions" USING btree ("template_id") WHERE "template_versions"."state" = 'draft';--> statement-breakpoint
CREATE INDEX "template_versions_tube_types_idx" ON "template_versions" USING gin ("tube_types");--> statement-breakpoint
CREATE UNIQUE INDEX "tube_types_designation_idx" ON "tube_types" USING btree ("designation");--> statement-breakpoint
CREATE INDEX "tube_types_designation_trgm_idx" ON "tube_types" USING gin ("designation" gin_trgm_ops);