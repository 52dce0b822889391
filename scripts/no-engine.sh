#!/bin/sh
echo "schema-engine-cli 7.10.0 (offline stand-in: generate never calls it)"
