// psychrolib ships no types (STACK.md P11); used only as a cross-check in tests.
declare module 'psychrolib';
