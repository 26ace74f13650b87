// The workbench's name for the core's register-value parser (one parser for browser, server and CLI).
export { parseRegisterValue as parseInputValue } from '$lib/quantum/inputs';
