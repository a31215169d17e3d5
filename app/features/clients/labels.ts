// Display names of the analytes a strip reads: the chemistry engine keeps the one list.
export { parameterName as analyteLabel } from "~/chemistry";
