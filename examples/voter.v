// Two-out-of-three voter for a triplicated sensor channel, with a disagreement flag, in the
// structural subset of IEEE 1364 Verilog. A scenario of our own.
module majority3(input a, input b, input c, output m);
  wire ab, bc, ca;
  and g1(ab, a, b);
  and g2(bc, b, c);
  and g3(ca, c, a);
  or  g4(m, ab, bc, ca);
endmodule

module voter(s, vote, disagree);
  input  [2:0] s;
  output vote, disagree;
  wire all1, all0;
  majority3 u1(.a(s[0]), .b(s[1]), .c(s[2]), .m(vote));
  and  (all1, s[2], s[1], s[0]);
  nor  (all0, s[2], s[1], s[0]);
  nor  (disagree, all1, all0);
endmodule
