"""The timing core in Verilog and VHDL, laid out from one precomputed CoreContext."""
