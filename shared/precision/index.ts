// The precision engine: pure functions from orbit data and field geometry to DOP and
// expected errors. See ../../DEVELOPERS.md and the engine specification.
export {}
