// The engine and dataset inlined by web/bundle.sh; on the normal site there are none
// and the page fetches both.
export default null;
