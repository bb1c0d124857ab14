process.env.NODE_ENV = process.env.NODE_ENV ?? 'test';
process.env.CRISTAE_QUIET = '1';
