/**
 * Metro bundler config for the Expo client.
 * - expo-sqlite's web build loads wa-sqlite as a .wasm asset; without 'wasm' in assetExts the
 *   web bundle fails to resolve it.
 * - server/ holds secrets-adjacent code (JWT, bcrypt, database access). Blocking it here turns an
 *   accidental client import of server code into a build error instead of a shipped bundle.
 */
const path = require('path');
const { getDefaultConfig } = require('expo/metro-config');

const config = getDefaultConfig(__dirname);

const escape = (value) => value.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');
const serverDir = path.join(__dirname, 'server') + path.sep;

config.resolver.assetExts = [...config.resolver.assetExts, 'wasm'];

const existing = config.resolver.blockList;
const blocked = [new RegExp(`^${escape(serverDir)}.*`)];
if (existing instanceof RegExp) blocked.push(existing);
else if (Array.isArray(existing)) blocked.push(...existing);
config.resolver.blockList = blocked;

module.exports = config;
