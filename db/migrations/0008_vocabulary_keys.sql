-- One vocabulary: JSON stored before the renaming used camelCase and capitalised unit names
-- (tempC, irradiance_Wm2, deviceId, powerClasses, …). Each statement renames one key where it is
-- present, keeping its value (a JSON null stays null); rows without it are untouched, so the
-- migration is safe on new rows and on a database where it already ran.
UPDATE "curve" SET "meta" = ("meta" - 'deviceId') || jsonb_build_object('device_id', "meta"->'deviceId') WHERE jsonb_typeof("meta") = 'object' AND "meta" ? 'deviceId';
--> statement-breakpoint
UPDATE "curve" SET "meta" = ("meta" - 'tempC') || jsonb_build_object('temp_c', "meta"->'tempC') WHERE jsonb_typeof("meta") = 'object' AND "meta" ? 'tempC';
--> statement-breakpoint
UPDATE "curve" SET "meta" = ("meta" - 'irradiance_Wm2') || jsonb_build_object('irradiance_w_m2', "meta"->'irradiance_Wm2') WHERE jsonb_typeof("meta") = 'object' AND "meta" ? 'irradiance_Wm2';
--> statement-breakpoint
UPDATE "curve" SET "meta" = ("meta" - 'measuredAt') || jsonb_build_object('measured_at', "meta"->'measuredAt') WHERE jsonb_typeof("meta") = 'object' AND "meta" ? 'measuredAt';
--> statement-breakpoint
UPDATE "curve" SET "stc" = jsonb_set("stc", '{from}', (("stc"->'from') - 'tempC') || jsonb_build_object('temp_c', "stc"->'from'->'tempC')) WHERE jsonb_typeof("stc"->'from') = 'object' AND "stc"->'from' ? 'tempC';
--> statement-breakpoint
UPDATE "curve" SET "stc" = jsonb_set("stc", '{from}', (("stc"->'from') - 'irradiance_Wm2') || jsonb_build_object('irradiance_w_m2', "stc"->'from'->'irradiance_Wm2')) WHERE jsonb_typeof("stc"->'from') = 'object' AND "stc"->'from' ? 'irradiance_Wm2';
--> statement-breakpoint
UPDATE "fit" SET "conditions" = ("conditions" - 'tempC') || jsonb_build_object('temp_c', "conditions"->'tempC') WHERE jsonb_typeof("conditions") = 'object' AND "conditions" ? 'tempC';
--> statement-breakpoint
UPDATE "fit" SET "conditions" = ("conditions" - 'irradiance_Wm2') || jsonb_build_object('irradiance_w_m2', "conditions"->'irradiance_Wm2') WHERE jsonb_typeof("conditions") = 'object' AND "conditions" ? 'irradiance_Wm2';
--> statement-breakpoint
UPDATE "spec" SET "body" = ("body" - 'powerClasses') || jsonb_build_object('power_classes', "body"->'powerClasses') WHERE jsonb_typeof("body") = 'object' AND "body" ? 'powerClasses';
--> statement-breakpoint
UPDATE "spec" SET "body" = ("body" - 'failFlags') || jsonb_build_object('fail_flags', "body"->'failFlags') WHERE jsonb_typeof("body") = 'object' AND "body" ? 'failFlags';
