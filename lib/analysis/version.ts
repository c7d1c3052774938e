/** Version of the analysis engine, stored with every report so results can be traced to the code. */
export const ENGINE_VERSION = "1.0.0";
