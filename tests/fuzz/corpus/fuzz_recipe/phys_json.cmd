#json: the JSON contract of junction, exchange, erev, ratio, iv and correct
solution bath; add NaCl 140; add KCl 5; add CaCl2 2
solution pip; add K-gluconate 135; add KCl 5
junction pip bath model all
solution lowcl; add Na-gluconate 140; add KCl 5; add CaCl2 2
exchange bath lowcl pipette pip
erev pip bath K=1 Na=0.04 Cl=0.45
ratio pip bath Na K at -40
iv pip bath K=1 from -60 to 0 step 30
correct value -70 by 14.2
