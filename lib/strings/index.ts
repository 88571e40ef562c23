/** String voltage sizing and the high-voltage caution (pure functions). */
export * from '@/lib/strings/cautions';
export * from '@/lib/strings/errors';
export * from '@/lib/strings/size-string';
