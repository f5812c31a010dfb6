import type { Role } from "./roles";

/**
 * Who a scoring request is made for: a signed-in person, or a laboratory information system
 * calling with its key. The score log records which (kind and id) and nothing about the patient.
 */
export type Principal = { kind: "user"; id: string; role: Role } | { kind: "lis"; id: string; name: string };
