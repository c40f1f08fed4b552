import "server-only";
export { db } from "./knex";
