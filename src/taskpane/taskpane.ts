/** Task pane entry: decides between the in-spreadsheet pane and the browser preview. */
import { startPane } from "./pane";

startPane();
