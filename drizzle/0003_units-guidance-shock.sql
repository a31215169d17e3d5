ALTER TABLE "treatment" ADD COLUMN "shock" boolean DEFAULT false NOT NULL;--> statement-breakpoint
ALTER TABLE "tub" ADD COLUMN "guidance" text DEFAULT 'us_home' NOT NULL;--> statement-breakpoint
ALTER TABLE "user" ADD COLUMN "units" text DEFAULT 'metric' NOT NULL;