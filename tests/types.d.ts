// jstat@1.9.6 ships no type declarations; tests use it only as a reference, so `any` is enough.
declare module 'jstat';
