/**
 * Stands in for @stdlib/assert-has-generator-support in the browser bundle (next.config.mjs,
 * turbopack.resolveAlias). The package asks `eval` whether generator functions parse, at module
 * load; under Bellwether's content security policy (no 'unsafe-eval') the browser refuses and
 * reports a violation. Every browser Bellwether supports has generator functions (ES2015).
 */
module.exports = function hasGeneratorSupport() {
  return true;
};
