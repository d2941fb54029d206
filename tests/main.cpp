// main.cpp - the Catch2 runner for saltpan's in-process tests.
#define CATCH_CONFIG_MAIN
#include <catch2/catch.hpp>
