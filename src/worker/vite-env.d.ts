// Vite's module types (`?url` imports of the wasm core) for the worker.
/// <reference types="vite/client" />
