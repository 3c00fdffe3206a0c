-- tb_addsub_unit: exhaustive check of the VHDL addsub_unit at width W (generic, 1..12)
-- against golden answers computed from decoded values with integer arithmetic:
-- mode 0: T = value(a) + value(b), co = carry (a + b >= 2^W unsigned);
-- mode 1: T = value(a) - value(b), co = NOT borrow (a - b >= 0 unsigned, the "carry"
-- convention); y = T mod 2^W, ovf = T outside -2^(W-1) .. 2^(W-1)-1, zero = (y = 0),
-- neg = y(W-1). Prints "N passed, M failed".
library ieee;
use ieee.std_logic_1164.all;
use ieee.numeric_std.all;
use std.textio.all;

entity tb_addsub_unit is
    generic (
        W : natural := 4);
end entity tb_addsub_unit;

architecture sim of tb_addsub_unit is
    signal a, b, y                  : std_logic_vector(W - 1 downto 0);
    signal mode, co, ovf, zero, neg : std_logic;
begin
    dut : entity work.addsub_unit
        generic map (W => W)
        port map (a => a, b => b, mode => mode, y => y, co => co, ovf => ovf, zero => zero,
                  neg => neg);

    stimulus : process
        variable va, vb, t, raw, passed, failed : integer;
        variable ey                             : std_logic_vector(W - 1 downto 0);
        variable eco, eovf, ezero, eneg         : std_logic;
        variable l                              : line;
    begin
        assert W >= 1 and W <= 12 report "tb_addsub_unit supports W = 1..12" severity failure;
        passed := 0;
        failed := 0;
        for ia in 0 to 2 ** W - 1 loop
            for ib in 0 to 2 ** W - 1 loop
                for im in 0 to 1 loop
                    a    <= std_logic_vector(to_unsigned(ia, W));
                    b    <= std_logic_vector(to_unsigned(ib, W));
                    mode <= '1' when im = 1 else '0';
                    wait for 1 ns;
                    va := ia;
                    if ia >= 2 ** (W - 1) then va := ia - 2 ** W; end if;
                    vb := ib;
                    if ib >= 2 ** (W - 1) then vb := ib - 2 ** W; end if;
                    if im = 1 then
                        t   := va - vb;
                        raw := ia - ib;
                        eco := '1' when raw >= 0 else '0';
                    else
                        t   := va + vb;
                        raw := ia + ib;
                        eco := '1' when raw >= 2 ** W else '0';
                    end if;
                    ey    := std_logic_vector(to_unsigned(t mod 2 ** W, W));
                    eovf  := '1' when t < -(2 ** (W - 1)) or t > 2 ** (W - 1) - 1 else '0';
                    ezero := '1' when t mod 2 ** W = 0 else '0';
                    eneg  := ey(W - 1);
                    if y = ey and co = eco and ovf = eovf and zero = ezero and neg = eneg then
                        passed := passed + 1;
                    else
                        failed := failed + 1;
                        if failed <= 6 then
                            write(l, string'("  FAIL addsub_unit.vhd W=") & to_string(W)
                                  & " a=" & to_hstring(a) & " b=" & to_hstring(b)
                                  & " mode=" & to_string(mode) & ": got y=" & to_hstring(y)
                                  & " co=" & to_string(co) & " ovf=" & to_string(ovf)
                                  & " zero=" & to_string(zero) & " neg=" & to_string(neg)
                                  & "; expected y=" & to_hstring(ey) & " co=" & to_string(eco)
                                  & " ovf=" & to_string(eovf) & " zero=" & to_string(ezero)
                                  & " neg=" & to_string(eneg));
                            writeline(output, l);
                        end if;
                    end if;
                end loop;
            end loop;
        end loop;
        write(l, string'("RESULT addsub_unit.vhd W=") & to_string(W) & ": "
              & to_string(passed) & " passed, " & to_string(failed) & " failed (exhaustive)");
        writeline(output, l);
        wait;
    end process stimulus;
end architecture sim;
