__version__ = "0.1.0"
#: bumped whenever a change could alter any certified result; part of every cache key
ENGINE_VERSION = "quadcert-engine-7"
