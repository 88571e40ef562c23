/** Batch statistics, acceptance rules and the pass/fail export (pure functions, JSON in and out). */
export * from '@/lib/quality/params';
export * from '@/lib/quality/errors';
export * from '@/lib/quality/describe';
export * from '@/lib/quality/welch';
export * from '@/lib/quality/robust-z';
export * from '@/lib/quality/spec';
export * from '@/lib/quality/evaluate';
export * from '@/lib/quality/csv';
export * from '@/lib/quality/compare-table';
export * from '@/lib/quality/uncertainty';
export * from '@/lib/quality/decision-rules';
