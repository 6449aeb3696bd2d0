// Entry of the review panel's webview (bundled to dist/webview/webview.js as an IIFE by esbuild.mjs).
// Only the web components the panel uses are imported.
import '@vscode-elements/elements/dist/vscode-button/index.js';
import '@vscode-elements/elements/dist/vscode-option/index.js';
import '@vscode-elements/elements/dist/vscode-single-select/index.js';
import '@vscode-elements/elements/dist/vscode-textfield/index.js';
import { HostBridge } from './hostBridge';
import { ReviewApp } from './reviewApp';

const root = document.getElementById('review-root');
if (root) new ReviewApp(root, new HostBridge()).start();
