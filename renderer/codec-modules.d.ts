// The codecs' Emscripten scripts ship without type declarations; wasm-codecs.ts types what is used.
declare module '@cornerstonejs/codec-charls/decodewasmjs';
declare module '@cornerstonejs/codec-openjpeg/decodewasmjs';
