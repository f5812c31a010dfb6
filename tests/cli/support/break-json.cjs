// Preloaded into the command line by tests/cli/main.test.ts to make it crash the way a bug
// would: JSON.stringify throws when asked to print an estimate document (and works for
// everything else, tsx's own messages included).
const stringify = JSON.stringify;
JSON.stringify = function (value, ...rest) {
  if (value !== null && typeof value === "object" && "nonparametric" in value) {
    throw new TypeError("JSON.stringify broken on purpose by the crash test");
  }
  return stringify.call(this, value, ...rest);
};
