// The same signed-in frame as the workspace; one layout, shared.
export const dynamic = "force-dynamic";
export { default } from "../(workspace)/layout";
