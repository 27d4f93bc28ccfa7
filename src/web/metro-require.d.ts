declare namespace NodeJS {
  interface Require {
    /** Metro: the number of a module in the bundle, without running it. */
    resolveWeak(id: string): number;
  }
}
