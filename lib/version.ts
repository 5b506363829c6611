/** quiver's version, recorded in every manifest. */
export const QUIVER_VERSION = "0.1.0";
