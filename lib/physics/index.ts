/** Device physics: carrier statistics, material models, quasi-Fermi levels, fit-to-physics and curve translation. */
export * from '@/lib/physics/errors';
export * from '@/lib/physics/fermi-dirac';
export * from '@/lib/physics/materials';
export * from '@/lib/physics/carriers';
export * from '@/lib/physics/diode';
export * from '@/lib/physics/fit-physics';
export * from '@/lib/physics/translate';
